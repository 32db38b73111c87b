import { Router, type Request } from 'express';
import {
  balanceCreateInputSchema,
  balanceListQuerySchema,
  balanceUpdateInputSchema,
  materialCreateInputSchema,
  materialListQuerySchema,
  materialUpdateInputSchema,
  retireInputSchema,
  solventCreateInputSchema,
  solventListQuerySchema,
  solventUpdateInputSchema,
  wareCreateInputSchema,
  wareListQuerySchema,
  wareUpdateInputSchema,
} from '../../shared/schemas/inventory.ts';
import { requireAuth, requireRole } from '../middleware/session.ts';
import * as inventory from '../services/inventory.service.ts';
import { parseId } from './params.ts';

const actor = (req: Request) => ({ id: req.user!.id, fullName: req.user!.fullName });

/**
 * Inventory registers. Any signed-in role reads; admin and chemists create, edit and retire.
 * There is no DELETE: an item is retired, never deleted.
 */
export function inventoryRouter(): Router {
  const router = Router();
  const editors = requireRole('admin', 'chemist');

  // Reference materials
  router.get('/materials', requireAuth, async (req, res) => {
    res.json(await inventory.listMaterials(materialListQuerySchema.parse(req.query)));
  });
  router.get('/materials/:id', requireAuth, async (req, res) => {
    res.json(await inventory.getMaterial(parseId(req.params.id, 'Reference material')));
  });
  router.post('/materials', editors, async (req, res) => {
    res.status(201).json(await inventory.createMaterial(materialCreateInputSchema.parse(req.body), actor(req)));
  });
  router.patch('/materials/:id', editors, async (req, res) => {
    const id = parseId(req.params.id, 'Reference material');
    res.json(await inventory.updateMaterial(id, materialUpdateInputSchema.parse(req.body), actor(req)));
  });
  router.post('/materials/:id/retire', editors, async (req, res) => {
    const id = parseId(req.params.id, 'Reference material');
    res.json(await inventory.retireMaterial(id, retireInputSchema.parse(req.body).reason, actor(req)));
  });

  // Balances
  router.get('/balances', requireAuth, async (req, res) => {
    res.json(await inventory.listBalances(balanceListQuerySchema.parse(req.query)));
  });
  router.get('/balances/:id', requireAuth, async (req, res) => {
    res.json(await inventory.getBalance(parseId(req.params.id, 'Balance')));
  });
  router.post('/balances', editors, async (req, res) => {
    res.status(201).json(await inventory.createBalance(balanceCreateInputSchema.parse(req.body), actor(req)));
  });
  router.patch('/balances/:id', editors, async (req, res) => {
    const id = parseId(req.params.id, 'Balance');
    res.json(await inventory.updateBalance(id, balanceUpdateInputSchema.parse(req.body), actor(req)));
  });
  router.post('/balances/:id/retire', editors, async (req, res) => {
    const id = parseId(req.params.id, 'Balance');
    res.json(await inventory.retireBalance(id, retireInputSchema.parse(req.body).reason, actor(req)));
  });

  // Volumetric ware
  router.get('/volumetric-ware', requireAuth, async (req, res) => {
    res.json(await inventory.listVolumetricWare(wareListQuerySchema.parse(req.query)));
  });
  router.get('/volumetric-ware/:id', requireAuth, async (req, res) => {
    res.json(await inventory.getVolumetricWare(parseId(req.params.id, 'Volumetric ware')));
  });
  router.post('/volumetric-ware', editors, async (req, res) => {
    res.status(201).json(await inventory.createVolumetricWare(wareCreateInputSchema.parse(req.body), actor(req)));
  });
  router.patch('/volumetric-ware/:id', editors, async (req, res) => {
    const id = parseId(req.params.id, 'Volumetric ware');
    res.json(await inventory.updateVolumetricWare(id, wareUpdateInputSchema.parse(req.body), actor(req)));
  });
  router.post('/volumetric-ware/:id/retire', editors, async (req, res) => {
    const id = parseId(req.params.id, 'Volumetric ware');
    res.json(await inventory.retireVolumetricWare(id, retireInputSchema.parse(req.body).reason, actor(req)));
  });

  // Solvents and diluents
  router.get('/solvents', requireAuth, async (req, res) => {
    res.json(await inventory.listSolvents(solventListQuerySchema.parse(req.query)));
  });
  router.get('/solvents/:id', requireAuth, async (req, res) => {
    res.json(await inventory.getSolvent(parseId(req.params.id, 'Solvent')));
  });
  router.post('/solvents', editors, async (req, res) => {
    res.status(201).json(await inventory.createSolvent(solventCreateInputSchema.parse(req.body), actor(req)));
  });
  router.patch('/solvents/:id', editors, async (req, res) => {
    const id = parseId(req.params.id, 'Solvent');
    res.json(await inventory.updateSolvent(id, solventUpdateInputSchema.parse(req.body), actor(req)));
  });
  router.post('/solvents/:id/retire', editors, async (req, res) => {
    const id = parseId(req.params.id, 'Solvent');
    res.json(await inventory.retireSolvent(id, retireInputSchema.parse(req.body).reason, actor(req)));
  });

  return router;
}
