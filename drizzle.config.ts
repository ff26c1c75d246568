// drizzle-kit: generates SQL migrations into drizzle/ from the schema (never `push`: it breaks on MariaDB).
import { defineConfig } from 'drizzle-kit';

export default defineConfig({
  dialect: 'mysql',
  schema: './src/lib/server/db/schema.ts',
  out: './drizzle',
});
