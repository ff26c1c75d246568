// Astro configuration: server output on the Node adapter, React islands, Tailwind 4 through Vite.
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';
import { fileURLToPath } from 'node:url';

/**
 * Puts src/lib/server/boot.ts ahead of the built server's entry, so its checks run when `node dist/server/entry.mjs`
 * starts (Astro loads middleware and pages only on the first request).
 */
function tidemarkBoot() {
  const boot = fileURLToPath(new URL('./src/lib/server/boot.ts', import.meta.url));
  return {
    name: 'tidemark-boot',
    apply: 'build',
    transform(code, id) {
      if (id === '\0@astrojs-ssr-virtual-entry') return { code: `import ${JSON.stringify(boot)};\n${code}`, map: null };
    },
  };
}

// Host names the app answers as (checked against the Host header; the origin check compares with them).
// Production: set TIDEMARK_HOSTS=previs.example.com (comma-separated) when building.
const hosts = ['127.0.0.1', 'localhost', ...(process.env.TIDEMARK_HOSTS ?? '').split(',').map((h) => h.trim()).filter(Boolean)];

export default defineConfig({
  output: 'server',
  // npm test builds into its own folder so a running `npm start` keeps serving its build.
  outDir: process.env.TIDEMARK_OUT_DIR ?? './dist',
  adapter: node({ mode: 'standalone' }),
  integrations: [react()],
  server: { host: '127.0.0.1', port: 4321 },
  security: { checkOrigin: true, allowedDomains: hosts.map((hostname) => ({ hostname })) },
  devToolbar: { enabled: false },
  telemetry: false,
  // Astro hashes the inline scripts and styles it emits (island loader, hydration) into the page's
  // Content-Security-Policy header; src/middleware.ts adds the other directives.

  vite: {
    plugins: [tailwindcss(), tidemarkBoot()],
    optimizeDeps: { exclude: ['@ffmpeg/ffmpeg', '@ffmpeg/util'] },
    ssr: { external: ['@node-rs/argon2', 'mysql2', 's3rver', 'maildev'] },
  },
});
