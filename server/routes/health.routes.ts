/**
 * GET /api/health        public: the process answers and its database too; reports the schema's migration
 *                        (the latest applied) and how many are pending. 503 when the database does not answer.
 * GET /api/health/ready  public, for a load balancer: 200 only when the database answers, no migration is pending
 *                        and the server is not shutting down (SIGTERM sets app.locals.shuttingDown); else 503.
 */
import { Router, type Request } from 'express';
import { QueryTypes } from 'sequelize';
import { User } from '../db/models/index.ts';
import { createMigrator } from '../db/migrate.ts';

interface DbState {
  database: 'ok' | 'unreachable';
  migration: string | null;
  pending: number;
}

async function dbState(): Promise<DbState> {
  const sequelize = User.sequelize;
  if (!sequelize) return { database: 'unreachable', migration: null, pending: 0 };
  try {
    await sequelize.query('SELECT 1', { type: QueryTypes.SELECT });
    const migrator = createMigrator(sequelize);
    const [executed, pending] = await Promise.all([migrator.executed(), migrator.pending()]);
    return { database: 'ok', migration: executed.at(-1)?.name ?? null, pending: pending.length };
  } catch {
    return { database: 'unreachable', migration: null, pending: 0 };
  }
}

export function healthRouter(): Router {
  const router = Router();
  router.get('/health', async (_req, res) => {
    const db = await dbState();
    res.status(db.database === 'ok' ? 200 : 503).json({ status: db.database === 'ok' ? 'ok' : 'unavailable', ...db });
  });
  router.get('/health/ready', async (req: Request, res) => {
    const db = await dbState();
    const reason =
      req.app.locals.shuttingDown === true ? 'shutting down' : db.database !== 'ok' ? 'database unreachable' : db.pending > 0 ? `${db.pending} migration(s) pending` : null;
    res.status(reason ? 503 : 200).json({ ready: reason === null, ...(reason ? { reason } : {}) });
  });
  return router;
}
