import { Router } from 'express';
import type { OutboxList, OutboxMessage } from '../../shared/schemas/preparations.ts';
import { FakeMail } from '../db/models/index.ts';
import { AppError } from '../errors/app-error.ts';
import { requireRole } from '../middleware/session.ts';
import { parseId } from './params.ts';

/** What the local fake SMTP server received (admin only; MAIL_MODE=fake). Read-only. */
export function outboxRouter(): Router {
  const router = Router();
  router.get('/outbox', requireRole('admin'), async (_req, res) => {
    const rows = await FakeMail.findAll({ attributes: ['id', 'toAddress', 'subject', 'receivedAt'], order: [['id', 'DESC']], limit: 500 });
    const body: OutboxList = { items: rows.map((m) => ({ id: m.id, to: m.toAddress, subject: m.subject, receivedAt: m.receivedAt })) };
    res.json(body);
  });
  router.get('/outbox/:id', requireRole('admin'), async (req, res) => {
    const m = await FakeMail.findByPk(parseId(req.params.id, 'Message'));
    if (!m) throw AppError.notFound('Message');
    const body: OutboxMessage = { id: m.id, from: m.fromAddress, to: m.toAddress, subject: m.subject, text: m.text, html: m.html, receivedAt: m.receivedAt };
    res.json(body);
  });
  return router;
}
