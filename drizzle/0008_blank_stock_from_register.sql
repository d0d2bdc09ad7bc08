CREATE TABLE "order_item_blanks" (
	"id" serial PRIMARY KEY NOT NULL,
	"order_id" integer NOT NULL,
	"order_item_id" integer NOT NULL,
	"unit" integer NOT NULL,
	"blank_id" integer NOT NULL,
	"tied_by" integer,
	"tied_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "products" ADD COLUMN "stock_source" text DEFAULT 'register' NOT NULL;--> statement-breakpoint
-- Blank products of a shop that existed before keep the count the maker typed until the maker switches them to the register.
UPDATE "products" SET "stock_source" = 'manual' WHERE "kind" = 'blank';--> statement-breakpoint
ALTER TABLE "order_item_blanks" ADD CONSTRAINT "order_item_blanks_order_id_orders_id_fk" FOREIGN KEY ("order_id") REFERENCES "public"."orders"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "order_item_blanks" ADD CONSTRAINT "order_item_blanks_order_item_id_order_items_id_fk" FOREIGN KEY ("order_item_id") REFERENCES "public"."order_items"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "order_item_blanks" ADD CONSTRAINT "order_item_blanks_blank_id_blanks_id_fk" FOREIGN KEY ("blank_id") REFERENCES "public"."blanks"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "order_item_blanks" ADD CONSTRAINT "order_item_blanks_tied_by_users_id_fk" FOREIGN KEY ("tied_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "order_item_blanks_blank" ON "order_item_blanks" USING btree ("blank_id");--> statement-breakpoint
CREATE UNIQUE INDEX "order_item_blanks_item_unit" ON "order_item_blanks" USING btree ("order_item_id","unit");--> statement-breakpoint
CREATE INDEX "order_item_blanks_order" ON "order_item_blanks" USING btree ("order_id");