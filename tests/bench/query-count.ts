/** Prints the SQL one request runs (`npx tsx tests/bench/query-count.ts /api/preparations ...`): a tool for finding repeated look-ups. */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import request from 'supertest';
import { createApp } from '../../server/app.ts';
import { loadConfig } from '../../server/config.ts';
import { migrateUp } from '../../server/db/migrate.ts';
import { openDatabase } from '../../server/db/sequelize.ts';
import { hashPassword } from '../../server/services/passwords.ts';
import { DEMO_PASSWORD } from '../../seed/demo-data.ts';
import { seedDemoLab } from '../../seed/seed-demo-lab.ts';

const dir = mkdtempSync(join(tmpdir(), 'tarebook-qc-'));
const dbPath = join(dir, 'qc.sqlite');
const sequelize = await openDatabase(dbPath);
try {
  await migrateUp(sequelize);
  await seedDemoLab(sequelize, { env: { NODE_ENV: 'test' }, passwordHash: await hashPassword(DEMO_PASSWORD) });
  if (process.env.QC_FILL) await (await import('./goals-bench.ts')).fillPreparations(sequelize, Number(process.env.QC_FILL));
  const app = createApp({ sequelize, config: loadConfig({ NODE_ENV: 'test', TAREBOOK_DB: dbPath, SESSION_SECRET: 'q'.repeat(40) }), distDir: join(dir, 'none') });
  const login = await request(app).post('/api/auth/login').send({ email: process.env.QC_USER ?? 'qa@harbourside.example', password: DEMO_PASSWORD });
  const cookie = ([] as string[]).concat(login.headers['set-cookie'] ?? []).find((c) => c.startsWith('tarebook_session='))!.split(';')[0]!;
  for (const path of process.argv.slice(2)) {
    await request(app).get(path).set('Cookie', cookie); // warm
    const seen: string[] = [];
    const options = (sequelize as unknown as { options: { logging: unknown; benchmark: boolean } }).options;
    options.benchmark = true;
    options.logging = (sql: string, ms: number) => void seen.push(`${String(ms).padStart(5)} ms  ${sql.replace(/^Executed \([^)]*\): /, '').slice(0, Number(process.env.QC_WIDTH ?? 160))}`);
    const res = await request(app).get(path).set('Cookie', cookie);
    options.logging = false;
    options.benchmark = false;
    console.log(`\n## ${path} → ${res.status}, ${seen.length} statements`);
    for (const s of seen) console.log('  ' + s);
  }
} finally {
  await sequelize.close();
  rmSync(dir, { recursive: true, force: true });
}
