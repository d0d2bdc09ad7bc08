import { defineConfig } from 'drizzle-kit'

// drizzle-kit only generates migrations here; the server applies them at start.
export default defineConfig({
  dialect: 'postgresql',
  schema: './server/db/schema.ts',
  out: './drizzle',
})
