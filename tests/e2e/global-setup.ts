import type { TestProject } from 'vitest/node';
import { startApp, type RunningApp } from './helpers/server';

let app: RunningApp | undefined;

/** Builds when needed, then serves the built app on its own seeded database for every e2e file. */
export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  app = await startApp('sumpwise_e2e');
  project.provide('baseUrl', app.baseUrl);
  project.provide('databaseUrl', app.databaseUrl);
  project.provide('smtpPort', app.smtpPort);
  return async () => { await app?.stop(); };
}
