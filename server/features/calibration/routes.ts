import { Router, type RequestHandler } from 'express';
import multer from 'multer';
import { idParamSchema, ROLES } from '@/shared/api/common';
import {
  compareParamsSchema, exportQuerySchema, FIT_ID_HEADER, FIT_VERSION_HEADER, refitRequestSchema, reviewRequestSchema, uploadOptionsSchema,
} from '@/shared/api/calibration';
import { principal } from '../../auth/middleware';
import type { RouteDeps } from '../../deps';
import { AppError } from '../../http/errors';
import { parse } from '../../http/validate';
import {
  activeCalibration, compareFits, exportFit, getFit, getJob, listFits, listSweeps, refit, reviewFit, uploadSweep, type CalibrationDeps, type UploadedFile,
} from './service';

const MAKERS = ['lab_lead', 'device_engineer'] as const;
/** A Touchstone set has one file per bias point; a few hundred is plenty. */
const MAX_FILES = 1000;

/** multipart/form-data with field `files` into memory, limits as clear 413/400 answers. */
function sweepUpload(limitMb: number): RequestHandler {
  const m = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: limitMb * 1024 * 1024, files: MAX_FILES, fields: 50, fieldSize: 64 * 1024 },
    // File names as the browser sends them (UTF-8), not busboy's latin1 default.
    defParamCharset: 'utf8',
  }).array('files', MAX_FILES);
  return (req, res, next) => {
    m(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        const where = err.field ? ` (field "${err.field}")` : '';
        switch (err.code) {
          case 'LIMIT_FILE_SIZE':
            return next(new AppError(413, 'PAYLOAD_TOO_LARGE', `a file${where} is larger than the upload limit of ${limitMb} MB (FW_UPLOAD_LIMIT_MB)`));
          case 'LIMIT_FILE_COUNT':
            return next(new AppError(413, 'PAYLOAD_TOO_LARGE', `too many files: at most ${MAX_FILES} per sweep`));
          case 'LIMIT_UNEXPECTED_FILE':
            return next(AppError.validation([{ path: err.field ?? 'files', message: 'send sweep files in the multipart field "files"' }]));
          default:
            return next(AppError.validation([{ path: err.field ?? '(body)', message: err.message }]));
        }
      }
      next(err);
    });
  };
}

export function calibrationRoutes({ dataSource, guard, jobs, mailer, config, log }: RouteDeps): Router {
  const r = Router();
  const d: CalibrationDeps = { dataSource, jobs, mailer, config, log };

  r.post('/devices/:id/sweeps', guard(...MAKERS), sweepUpload(config.uploadLimitMb), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    if (!req.is('multipart/form-data')) {
      throw AppError.validation([{ path: 'files', message: 'send the sweep as multipart/form-data with the file(s) in the field "files"' }]);
    }
    const opts = parse(uploadOptionsSchema, req.body ?? {});
    const files = ((req.files as Express.Multer.File[] | undefined) ?? []) as UploadedFile[];
    const out = await uploadSweep(d, principal(req).row, id, files, opts);
    res.status(out.status).json(out.body);
  });
  r.get('/devices/:id/sweeps', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    res.json({ sweeps: await listSweeps(dataSource, principal(req).user.labId, id) });
  });
  r.get('/jobs/:id', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    res.json(await getJob(dataSource, principal(req).user.labId, id));
  });
  r.get('/devices/:id/fits', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    res.json({ fits: await listFits(dataSource, principal(req).user.labId, id) });
  });
  r.get('/devices/:id/calibration', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    const { fit, calibration } = await activeCalibration(dataSource, principal(req).user.labId, id);
    res.set(FIT_ID_HEADER, String(fit.id));
    res.set(FIT_VERSION_HEADER, String(fit.version));
    res.set('Access-Control-Expose-Headers', `${FIT_ID_HEADER}, ${FIT_VERSION_HEADER}`);
    res.json(calibration);
  });
  r.get('/fits/:a/compare/:b', guard(...ROLES), async (req, res) => {
    const { a, b } = parse(compareParamsSchema, req.params, 'params');
    res.json(await compareFits(dataSource, principal(req).user.labId, a, b));
  });
  r.get('/fits/:id/export', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    const { format } = parse(exportQuerySchema, req.query, 'query');
    const file = await exportFit(dataSource, principal(req).row, id, format);
    res.attachment(file.filename);
    res.set('Content-Type', file.contentType);
    res.send(file.body);
  });
  r.get('/fits/:id', guard(...ROLES), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    res.json({ fit: await getFit(dataSource, principal(req).user.labId, id) });
  });
  r.post('/fits/:id/review', guard(...MAKERS), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    const body = parse(reviewRequestSchema, req.body);
    res.json({ fit: await reviewFit(d, principal(req).row, id, body) });
  });
  r.post('/fits/:id/refit', guard(...MAKERS), async (req, res) => {
    const { id } = parse(idParamSchema, req.params, 'params');
    const body = parse(refitRequestSchema, req.body);
    const out = await refit(d, principal(req).row, id, body);
    res.status(out.status).json(out.body);
  });
  return r;
}
