import { Router } from 'express';
import { createUserInputSchema, setPasswordInputSchema, updateUserInputSchema } from '../../shared/schemas/users.ts';
import { requireRole } from '../middleware/session.ts';
import * as users from '../services/users.service.ts';
import { parseId } from './params.ts';

export function usersRouter(): Router {
  const router = Router();
  const adminOnly = requireRole('admin');

  router.get('/users', adminOnly, async (_req, res) => {
    res.json({ items: await users.listUsers() });
  });

  router.post('/users', adminOnly, async (req, res) => {
    const input = createUserInputSchema.parse(req.body);
    res.status(201).json({ user: await users.createUser(input, req.user!) });
  });

  router.get('/users/:id', adminOnly, async (req, res) => {
    res.json({ user: await users.getUser(parseId(req.params.id, 'User')) });
  });

  router.patch('/users/:id', adminOnly, async (req, res) => {
    const id = parseId(req.params.id, 'User');
    const input = updateUserInputSchema.parse(req.body);
    res.json({ user: await users.updateUser(id, input, req.user!) });
  });

  router.post('/users/:id/unlock', adminOnly, async (req, res) => {
    res.json({ user: await users.unlockUser(parseId(req.params.id, 'User'), req.user!) });
  });

  router.post('/users/:id/password', adminOnly, async (req, res) => {
    const id = parseId(req.params.id, 'User');
    const { password } = setPasswordInputSchema.parse(req.body);
    res.json({ user: await users.setUserPassword(id, password, req.user!) });
  });

  return router;
}
