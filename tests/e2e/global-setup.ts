import type { TestProject } from 'vitest/node';
import { startApp, type RunningApp } from './helpers/server';
import { dropEmbeddedDatabase } from '../../scripts/lib/database';

let app: RunningApp | undefined;

/** Builds when needed, then serves the built app on its own seeded database for every e2e file. */
export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  // One database per run, so two runs at once never drop each other's.
  app = await startApp(`sumpwise_e2e_${process.pid}`);
  project.provide('baseUrl', app.baseUrl);
  project.provide('databaseUrl', app.databaseUrl);
  project.provide('smtpPort', app.smtpPort);
  project.provide('s3Endpoint', app.env.S3_ENDPOINT!);
  return async () => {
    await app?.stop();
    if (app) dropEmbeddedDatabase(new URL(app.databaseUrl).pathname.slice(1));
  };
}
