import { Router, type RequestHandler } from 'express';
import multer from 'multer';
import { CERTIFICATE_MAX_BYTES, certificateNoteSchema } from '../../shared/schemas/inventory.ts';
import type { Config } from '../config.ts';
import { AppError } from '../errors/app-error.ts';
import { requireAuth, requireRole } from '../middleware/session.ts';
import * as certificates from '../services/certificates.service.ts';
import { parseId } from './params.ts';

const MAX_MB = CERTIFICATE_MAX_BYTES / (1024 * 1024);

/** multer and busboy errors as API errors: too large → 413, anything else malformed → 400; never 500. */
function uploadErrorToAppError(err: unknown): AppError {
  if (err instanceof multer.MulterError) {
    if (err.code === 'LIMIT_FILE_SIZE') {
      return new AppError('payload_too_large', 413, `The file is larger than ${MAX_MB} MB`, { fields: { file: `Upload a file of at most ${MAX_MB} MB` } });
    }
    if (err.code === 'LIMIT_UNEXPECTED_FILE' || err.code === 'LIMIT_FILE_COUNT') {
      return AppError.validation('Send one file in the form field "file"', { file: 'Send one file in the form field "file"' });
    }
    if (err.code === 'LIMIT_FIELD_VALUE' || err.code === 'LIMIT_FIELD_COUNT' || err.code === 'LIMIT_FIELD_KEY' || err.code === 'LIMIT_PART_COUNT') {
      return AppError.validation('The form has too many or too long fields', { note: 'Keep the note under 500 characters' });
    }
    return AppError.validation('The upload could not be read', { file: 'The upload could not be read' });
  }
  return new AppError('bad_request', 400, 'The upload could not be read; send multipart/form-data with the file in the field "file"', {
    fields: { file: 'The upload could not be read' },
  });
}

export function certificatesRouter(config: Config): Router {
  const router = Router();
  const upload = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: CERTIFICATE_MAX_BYTES, files: 1, fields: 5, fieldSize: 4000, parts: 8 },
  }).single('file');
  const receiveFile: RequestHandler = (req, res, next) => {
    upload(req, res, (err?: unknown) => (err ? next(uploadErrorToAppError(err)) : next()));
  };

  router.post('/materials/:id/certificates', requireRole('admin', 'chemist'), receiveFile, async (req, res) => {
    const materialId = parseId(req.params.id, 'Reference material');
    const note = certificateNoteSchema.parse((req.body as Record<string, unknown> | undefined)?.note) ?? null;
    const dto = await certificates.uploadCertificate(config.dataDir, materialId, req.file, note, { id: req.user!.id, fullName: req.user!.fullName });
    res.status(201).json(dto);
  });

  router.get('/materials/:id/certificates', requireAuth, async (req, res) => {
    res.json({ items: await certificates.listCertificates(parseId(req.params.id, 'Reference material')) });
  });

  router.get('/certificates/:id/file', requireAuth, async (req, res) => {
    const file = await certificates.certificateFile(config.dataDir, parseId(req.params.id, 'Certificate'));
    res.attachment(file.originalName);
    res.type(file.mimeType);
    res.setHeader('Cache-Control', 'private, no-store');
    await new Promise<void>((resolve, reject) => res.sendFile(file.path, (err) => (err ? reject(err) : resolve())));
  });

  return router;
}
