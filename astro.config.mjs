// Astro configuration: server output on the Node adapter, React islands, Tailwind 4 through Vite.
import { defineConfig } from 'astro/config';
import node from '@astrojs/node';
import react from '@astrojs/react';
import tailwindcss from '@tailwindcss/vite';

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
  vite: {
    plugins: [tailwindcss()],
    optimizeDeps: { exclude: ['@ffmpeg/ffmpeg', '@ffmpeg/util'] },
    ssr: { external: ['@node-rs/argon2', 'mysql2', 's3rver', 'maildev'] },
  },
});
