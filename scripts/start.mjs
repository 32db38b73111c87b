/**
 * `npm start`: compile the server when build/ is missing or older than the sources (scripts/build-server.mjs),
 * then run the compiled server with plain node (server/index.ts builds the client when dist/ is missing).
 *
 * React and the PDF reconciler pick their production or development build once, when they are first loaded,
 * from process.env.NODE_ENV. They are loaded here with NODE_ENV=production, then NODE_ENV is put back as it
 * was, so the server's own configuration (production cookies, demo seed, SESSION_SECRET rule: server/config.ts)
 * still follows the environment the user gave. `npm run dev` keeps tsx and React's development build.
 */
import { existsSync } from 'node:fs';
import { buildServer, needsServerBuild } from './build-server.mjs';

// Variables from ./.env when it exists (see .env.example); the environment given to the process wins.
if (existsSync('.env')) process.loadEnvFile('.env');

if (needsServerBuild()) {
  try {
    await import('esbuild');
  } catch {
    // a production install (npm ci --omit=dev) has no compiler: build/ is made beforehand by `npm run build`
    console.error('Tarebook cannot start: build/ (the compiled server) is missing or older than its sources, and esbuild (a dev dependency) is not installed. Run `npm run build` where the dev dependencies are installed and ship build/ and dist/ with the app.');
    process.exit(1);
  }
  await buildServer();
}

const given = process.env.NODE_ENV;
process.env.NODE_ENV = 'production';
try {
  await import('react');
  await import('react/jsx-runtime');
  await import('@react-pdf/reconciler');
} finally {
  if (given === undefined) delete process.env.NODE_ENV;
  else process.env.NODE_ENV = given;
}

await import('../build/server/index.js');
