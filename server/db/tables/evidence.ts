// Tables of this area, merged into the Database interface (server/db/database.ts).
// eslint-disable-next-line @typescript-eslint/no-empty-object-type
export interface EvidenceTables {}
