import { defineConfig } from "drizzle-kit";

// drizzle-kit does not read .env itself; generation needs no live database, migration does.
export default defineConfig({
  dialect: "postgresql",
  schema: "./db/schema/index.ts",
  out: "./drizzle",
  dbCredentials: { url: process.env.DATABASE_URL ?? "postgres://localhost/partita" },
  strict: true,
});
