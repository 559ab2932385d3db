import { readFileSync } from 'node:fs';
import path from 'node:path';

// The project's own PostgreSQL asks for a password even on loopback (scram-sha-256). scripts/db.sh generates
// one per clone into .data/pg-password (mode 600); this module hands it to every connection made without one,
// through PGPASSWORD (which node-postgres, pg-boss and the PostgreSQL tools all read), so a DATABASE_URL
// without a password keeps working. A password in DATABASE_URL, or a PGPASSWORD already set, wins.

/** Where scripts/db.sh keeps the embedded server's password, relative to the project folder. */
export const EMBEDDED_PASSWORD_FILE = path.join('.data', 'pg-password');

/** Sets PGPASSWORD from the embedded server's password file when it is unset and the file exists. */
export function useEmbeddedPassword(root: string = process.cwd(), env: NodeJS.ProcessEnv = process.env): void {
  if (env.PGPASSWORD) return;
  try {
    const password = readFileSync(path.join(root, EMBEDDED_PASSWORD_FILE), 'utf8').trim();
    if (password) env.PGPASSWORD = password;
  } catch {
    // No embedded server here (an external DATABASE_URL): nothing to do.
  }
}

useEmbeddedPassword();
