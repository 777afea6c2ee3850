import { defineConfig } from 'drizzle-kit';

// `npm run db:generate` only diffs the schema against drizzle/meta; it never opens the app's data folder.
export default defineConfig({
	dialect: 'postgresql',
	schema: './src/lib/server/db/schema/index.ts',
	out: './drizzle',
	strict: true
});
