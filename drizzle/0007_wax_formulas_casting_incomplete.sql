ALTER TYPE "public"."test_verdict" ADD VALUE 'incomplete';--> statement-breakpoint
ALTER TABLE "products" ADD COLUMN "wax_formula_id" text;--> statement-breakpoint
ALTER TABLE "tickets" ADD COLUMN "blank_override_reason" text;--> statement-breakpoint
ALTER TABLE "wax_batches" ADD COLUMN "wax_formula_id" text;--> statement-breakpoint
ALTER TABLE "wax_batches" ADD COLUMN "melt_temp_c" double precision;--> statement-breakpoint
ALTER TABLE "wax_batches" ADD COLUMN "pour_temp_c" double precision;--> statement-breakpoint
ALTER TABLE "wax_batches" ADD COLUMN "mould_temp_c" double precision;--> statement-breakpoint
ALTER TABLE "wax_batches" ADD COLUMN "cooling_minutes" integer;--> statement-breakpoint
ALTER TABLE "wax_batches" ADD COLUMN "cast_count" integer;--> statement-breakpoint
ALTER TABLE "wax_batches" ADD COLUMN "rejected_at_casting" integer;