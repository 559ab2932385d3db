// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwind from '@astrojs/tailwind';

// The public URL decides which forwarded hosts are trusted; loopback names are always allowed.
const publicUrl = new URL(process.env.PUBLIC_URL || 'http://127.0.0.1:4321');
const hosts = [...new Set([publicUrl.hostname, 'localhost', '127.0.0.1'])];

export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [react(), tailwind({ applyBaseStyles: false })],
  site: publicUrl.origin,
  server: { host: '127.0.0.1', port: 4321 },
  security: {
    // The origin check lives in src/middleware.ts (src/lib/http/origin-check.ts): it covers every write
    // and exempts the one-click unsubscribe address, which Astro's own check cannot.
    checkOrigin: false,
    allowedDomains: hosts.map((hostname) => ({ hostname })),
  },
  image: { service: { entrypoint: 'astro/assets/services/noop' } },
  telemetry: false,
  devToolbar: { enabled: false },
  // Fonts and images stay files (cacheable, and allowed by the content security policy's font-src 'self').
  vite: { build: { sourcemap: false, assetsInlineLimit: 0 } },
});
