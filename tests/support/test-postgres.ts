// The tests' own PostgreSQL: its own data folder and port, apart from the demo's.
export const TEST_PG = {
  dataDir: process.env.TEST_PG_DATA_DIR ?? '.data/pg-test',
  port: Number(process.env.TEST_PG_PORT ?? 54329),
  database: 'postgres',
}
