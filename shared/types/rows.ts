// Rows of the database tables as Drizzle reads them, declared once from the schema. Type-only imports:
// nothing of the server is bundled into the pages by using them. Server code names a row by these
// (BlankRow, OrderRow, …) rather than declaring its own copy.
import type { blanks, claims, customMessages, files, heatChecks, orderItems, orders, products, proofs, recorders, surfaceTests, tickets, waxBatches } from '../../server/db/schema'

export type BlankRow = typeof blanks.$inferSelect
export type StoredFileRow = typeof files.$inferSelect
export type OrderRow = typeof orders.$inferSelect
export type OrderItemRow = typeof orderItems.$inferSelect
export type ProductRow = typeof products.$inferSelect
export type RecorderRow = typeof recorders.$inferSelect
export type SurfaceTestRow = typeof surfaceTests.$inferSelect
export type WaxBatchRow = typeof waxBatches.$inferSelect
export type TicketRow = typeof tickets.$inferSelect
export type ProofRow = typeof proofs.$inferSelect
export type CustomMessageRow = typeof customMessages.$inferSelect
export type ClaimRow = typeof claims.$inferSelect
export type HeatCheckRow = typeof heatChecks.$inferSelect
