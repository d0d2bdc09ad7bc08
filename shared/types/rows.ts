// Rows of the database tables as Drizzle reads them, declared once from the schema. Type-only imports:
// nothing of the server is bundled into the pages by using them. Server code names a row by these
// (BlankRow, OrderRow, …) rather than declaring its own copy.
import type { blanks, files, orderItems, orders, products, recorders, surfaceTests, waxBatches } from '../../server/db/schema'

export type BlankRow = typeof blanks.$inferSelect
export type StoredFileRow = typeof files.$inferSelect
export type OrderRow = typeof orders.$inferSelect
export type OrderItemRow = typeof orderItems.$inferSelect
export type ProductRow = typeof products.$inferSelect
export type RecorderRow = typeof recorders.$inferSelect
export type SurfaceTestRow = typeof surfaceTests.$inferSelect
export type WaxBatchRow = typeof waxBatches.$inferSelect
