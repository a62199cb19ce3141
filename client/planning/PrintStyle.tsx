import { useEffect } from 'react';
import { Platform } from 'react-native';

// Print layout of a plan sheet: no navigation or buttons, black on white, every scroll view let out
// to its full height so the whole sheet prints (RN-web scroll views are fixed-height boxes).
const CSS = `
@media print {
  @page { margin: 14mm; }
  html, body { background: #fff !important; }
  body, body * { color: #000 !important; box-shadow: none !important; }
  html, body, #root, #root div { height: auto !important; max-height: none !important; min-height: 0 !important; overflow: visible !important; }
  #root div { background-color: transparent !important; border-color: #999 !important; }
  [data-testid="nav-rail"], [data-testid="tab-bar"], [data-testid="top-bar"], [data-testid="plans-list-pane"], [data-testid="back-to-plans"],
  [role="button"], [data-print="hide"], [data-testid$="-noprint"] { display: none !important; }
  canvas { max-width: 100% !important; }
  #root [data-testid="threshold-gauge"] > div:first-child { height: 12px !important; border: 1px solid #000 !important; }
  #root [data-testid="threshold-gauge-fill"] { background-color: #555 !important; -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}`;

/** Injects the print stylesheet while a plan sheet is open (web only). */
export function PrintStyle() {
  useEffect(() => {
    if (Platform.OS !== 'web' || typeof document === 'undefined') return;
    const el = document.createElement('style');
    el.id = 'fw-plan-print';
    el.setAttribute('media', 'print');
    el.textContent = CSS;
    document.head.appendChild(el);
    return () => el.remove();
  }, []);
  return null;
}
