import type { ErrorRequestHandler, RequestHandler } from 'express';
import { AppError } from './app-error.ts';
import { toApiError } from './to-api-error.ts';
import { logger } from '../logger.ts';

/** Registered after the routers: any request under /api that no route matched. */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new AppError('not_found', 404, `No API route for ${req.method} ${req.originalUrl.split('?')[0]}`));
};

/** Registered last. Sends the API error body; logs unexpected errors with their stack (server side only). */
export const errorMiddleware: ErrorRequestHandler = (err, req, res, next) => {
  if (res.headersSent) return next(err);
  const { status, body, unexpected } = toApiError(err);
  if (unexpected) logger.error({ err, reqId: (req as { id?: unknown }).id, method: req.method, path: req.originalUrl.split('?')[0] }, 'request failed');
  res.status(status).json(body);
};
