import { defineConfig } from 'drizzle-kit';

// PostgreSQL migrations, from the schema generated out of db/schema/ (npm run db:generate:pg).
export default defineConfig({
  dialect: 'postgresql',
  schema: './db/pg/schema.ts',
  out: './migrations/pg',
});
