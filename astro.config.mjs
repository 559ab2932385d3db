// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwind from '@astrojs/tailwind';

// The public URL decides which hosts the origin check trusts; loopback names are always allowed so the
// built server answers same-origin form posts in development and tests.
const publicUrl = new URL(process.env.PUBLIC_URL || 'http://127.0.0.1:4321');
const hosts = [...new Set([publicUrl.hostname, 'localhost', '127.0.0.1'])];

export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [react(), tailwind({ applyBaseStyles: false })],
  site: publicUrl.origin,
  server: { host: '127.0.0.1', port: 4321 },
  security: {
    checkOrigin: true,
    allowedDomains: hosts.map((hostname) => ({ hostname })),
  },
  image: { service: { entrypoint: 'astro/assets/services/noop' } },
  telemetry: false,
  devToolbar: { enabled: false },
  // Fonts and images stay files (cacheable, and allowed by the content security policy's font-src 'self').
  vite: { build: { sourcemap: false, assetsInlineLimit: 0 } },
});
