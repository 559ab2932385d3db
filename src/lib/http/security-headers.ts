import { createHash } from 'node:crypto';
import islandScript from 'astro/runtime/server/astro-island.prebuilt.js';
import idleDirective from 'astro/runtime/client/idle.prebuilt.js';
import loadDirective from 'astro/runtime/client/load.prebuilt.js';
import mediaDirective from 'astro/runtime/client/media.prebuilt.js';
import onlyDirective from 'astro/runtime/client/only.prebuilt.js';
import visibleDirective from 'astro/runtime/client/visible.prebuilt.js';

// Scripts run only from this origin's files, plus the few inline scripts Astro itself writes into a page
// with an island (the island element and its client:* directive), allowed one by one by their SHA-256
// (CSP Level 3, "hash-source"). Our own scripts are bundled files, never inline, so no 'unsafe-inline'.

/** 'sha256-…' sources for a list of exact inline script texts. */
export function scriptHashSources(scripts: readonly string[]): string[] {
  return scripts.map((s) => `'sha256-${createHash('sha256').update(s, 'utf8').digest('base64')}'`);
}

/** Astro's own inline scripts (astro/runtime/server/scripts.js writes each as `<script>${text}</script>`). */
export const ASTRO_INLINE_SCRIPTS = [
  islandScript,
  idleDirective,
  loadDirective,
  mediaDirective,
  onlyDirective,
  visibleDirective,
] as const;

const SCRIPT_SRC = ["'self'", ...scriptHashSources(ASTRO_INLINE_SCRIPTS)].join(' ');

/** Headers every response carries: a content security policy the pages pass, and the usual hardening. */
export function securityHeaders(): Record<string, string> {
  return {
    'content-security-policy': [
      "default-src 'self'",
      `script-src ${SCRIPT_SRC}`,
      // Inline style attributes remain (chart sizes, Uppy's widgets); styles cannot run code.
      "style-src 'self' 'unsafe-inline'",
      "img-src 'self' data: blob:",
      "font-src 'self'",
      "connect-src 'self'",
      // A same-origin service worker and web app manifest (offline drain cards).
      "worker-src 'self'",
      "manifest-src 'self'",
      "object-src 'none'",
      "base-uri 'self'",
      "form-action 'self'",
      "frame-ancestors 'none'",
    ].join('; '),
    'x-content-type-options': 'nosniff',
    'referrer-policy': 'same-origin',
    'x-frame-options': 'DENY',
    'permissions-policy': 'camera=(self), geolocation=(), microphone=()',
  };
}
