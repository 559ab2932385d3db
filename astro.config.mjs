// @ts-check
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwind from '@astrojs/tailwind';
import AstroPWA from '@vite-pwa/astro';

// The public URL decides which forwarded hosts are trusted; loopback names are always allowed.
const publicUrl = new URL(process.env.PUBLIC_URL || 'http://127.0.0.1:4321');
const hosts = [...new Set([publicUrl.hostname, 'localhost', '127.0.0.1'])];

export default defineConfig({
  output: 'server',
  adapter: node({ mode: 'standalone' }),
  integrations: [
    react(),
    tailwind({ applyBaseStyles: false }),
    // The installable app: manifest and a service worker of our own (src/sw.ts, Workbox), registered by
    // src/components/offline/offline-boot.ts. A new version waits for the rider's "reload" (prompt).
    AstroPWA({
      strategies: 'injectManifest',
      srcDir: 'src',
      filename: 'sw.ts',
      registerType: 'prompt',
      injectRegister: false,
      manifest: {
        id: '/',
        name: 'Sumpwise',
        short_name: 'Sumpwise',
        description: 'Drain cards, oil changes and wear trends for your engines, in the garage with or without signal.',
        start_url: '/',
        scope: '/',
        display: 'standalone',
        // steel-700 and paper from tailwind.config.cjs.
        theme_color: '#1f4560',
        background_color: '#f7f5f0',
        icons: [
          { src: '/icons/icon-192.png', sizes: '192x192', type: 'image/png', purpose: 'any' },
          { src: '/icons/icon-512.png', sizes: '512x512', type: 'image/png', purpose: 'any' },
          { src: '/icons/icon-maskable-512.png', sizes: '512x512', type: 'image/png', purpose: 'maskable' },
          { src: '/icons/icon.svg', sizes: 'any', type: 'image/svg+xml', purpose: 'any' },
        ],
      },
      injectManifest: {
        // Scripts, styles, the Latin font files (the interface is in English), icons and the offline page.
        globPatterns: [
          '_astro/**/*.{js,css}',
          '_astro/**/*-latin-*.woff2',
          '_astro/**/*-latin-ext-*.woff2',
          'icons/*.{png,svg}',
          'favicon.svg',
          'offline.html',
        ],
        maximumFileSizeToCacheInBytes: 3 * 1024 * 1024,
        // Keep file names as they are: the integration's default turns offline.html into /offline, a
        // page the server does not have (pages here are rendered on the server, not prebuilt).
        manifestTransforms: [async (entries) => ({ manifest: entries, warnings: [] })],
      },
      devOptions: { enabled: false },
    }),
  ],
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
