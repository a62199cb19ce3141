import { createHash } from 'node:crypto';
import { existsSync, readFileSync, readdirSync, statSync } from 'node:fs';
import path from 'node:path';
import express, { type RequestHandler, Router } from 'express';

/**
 * One route per exported HTML file. Expo Router's static export writes e.g. dist/index.html,
 * dist/sign-in.html, dist/(app)/devices/[id].html: groups "(x)" do not appear in the URL,
 * "[param]" matches one segment, "[...rest]" one or more, "index" is the folder itself.
 */
interface HtmlRoute {
  file: string;
  segments: string[];
  score: number;
}

function collectHtml(dir: string, rel = ''): string[] {
  const out: string[] = [];
  for (const name of readdirSync(path.join(dir, rel))) {
    const r = path.join(rel, name);
    const st = statSync(path.join(dir, r));
    if (st.isDirectory()) {
      if (name === '_expo' || name === 'assets') continue;
      out.push(...collectHtml(dir, r));
    } else if (name.endsWith('.html')) out.push(r);
  }
  return out;
}

export function buildHtmlRoutes(dir: string): HtmlRoute[] {
  const routes: HtmlRoute[] = [];
  for (const file of collectHtml(dir)) {
    const parts = file.replace(/\.html$/, '').split(path.sep);
    if (parts.some((p) => p.startsWith('+') || p.startsWith('_'))) continue; // +not-found, _sitemap, _layout
    const segments = parts.filter((p) => !/^\(.*\)$/.test(p));
    if (segments[segments.length - 1] === 'index') segments.pop();
    // Static segments beat [param], which beats [...rest]; deeper static paths first.
    const score = segments.reduce((s, seg) => s + (seg.startsWith('[...') ? 1 : seg.startsWith('[') ? 10 : 100), 0);
    routes.push({ file, segments, score });
  }
  return routes.sort((a, b) => b.score - a.score || b.segments.length - a.segments.length);
}

export function matchHtmlRoute(routes: HtmlRoute[], urlPath: string): string | undefined {
  const segs = urlPath.split('/').filter(Boolean).map((s) => {
    try {
      return decodeURIComponent(s);
    } catch {
      return s;
    }
  });
  for (const r of routes) {
    let ok = true;
    let i = 0;
    for (; i < r.segments.length; i++) {
      const seg = r.segments[i];
      if (seg.startsWith('[...')) {
        // A catch-all needs at least one segment to catch.
        ok = i < segs.length;
        i = segs.length;
        break;
      }
      if (i >= segs.length) {
        ok = false;
        break;
      }
      if (!seg.startsWith('[') && seg !== segs[i]) {
        ok = false;
        break;
      }
    }
    if (ok && i === segs.length) return r.file;
  }
  return undefined;
}

const INLINE_SCRIPT = /<script(?![^>]*\bsrc=)[^>]*>([\s\S]*?)<\/script>/g;

/**
 * CSP hash sources ('sha256-…') of every inline script in the exported HTML, so the policy can
 * allow Expo's hydration bootstrap without 'unsafe-inline'. Re-read at most every 5 s.
 */
export function inlineScriptHashes(dir: string): () => string[] {
  let cached: string[] = [];
  let at = 0;
  return () => {
    if (Date.now() - at < 5000) return cached;
    at = Date.now();
    if (!existsSync(dir)) return (cached = []);
    const set = new Set<string>();
    for (const f of collectHtml(dir)) {
      const html = readFileSync(path.join(dir, f), 'utf8');
      for (const m of html.matchAll(INLINE_SCRIPT)) {
        set.add(`'sha256-${createHash('sha256').update(m[1], 'utf8').digest('base64')}'`);
      }
    }
    return (cached = [...set].sort());
  };
}

/** Static files, then the exported HTML for the route, then +not-found.html (404) or index.html. */
export function staticSite(staticDir: string): RequestHandler {
  const router = Router();
  // sendFile needs an absolute path; a relative FW_STATIC_DIR is taken from the working directory.
  const dir = path.resolve(staticDir);
  if (!existsSync(dir)) return router;
  // redirect: false — a route such as /devices has both devices.html and a devices/ folder.
  router.use(express.static(dir, { index: false, extensions: [], fallthrough: true, maxAge: 0, redirect: false }));
  let routes = buildHtmlRoutes(dir);
  let builtAt = Date.now();
  router.use((req, res, next) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') return next();
    // Re-scan now and then so a rebuilt export is picked up without a restart.
    if (Date.now() - builtAt > 5000) {
      routes = buildHtmlRoutes(dir);
      builtAt = Date.now();
    }
    const file = matchHtmlRoute(routes, req.path);
    if (file) return res.sendFile(path.join(dir, file));
    const notFound = path.join(dir, '+not-found.html');
    if (existsSync(notFound)) return res.status(404).sendFile(notFound);
    const index = path.join(dir, 'index.html');
    if (existsSync(index)) return res.sendFile(index);
    next();
  });
  return router;
}
