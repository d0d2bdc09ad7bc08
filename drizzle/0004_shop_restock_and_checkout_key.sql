CREATE TABLE "refund_items" (
	"id" serial PRIMARY KEY NOT NULL,
	"refund_id" integer NOT NULL,
	"order_item_id" integer NOT NULL,
	"quantity" integer NOT NULL,
	CONSTRAINT "refund_items_quantity_positive" CHECK ("refund_items"."quantity" > 0)
);
--> statement-breakpoint
ALTER TABLE "orders" ADD COLUMN "checkout_key" text;--> statement-breakpoint
ALTER TABLE "refund_items" ADD CONSTRAINT "refund_items_refund_id_refunds_id_fk" FOREIGN KEY ("refund_id") REFERENCES "public"."refunds"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "refund_items" ADD CONSTRAINT "refund_items_order_item_id_order_items_id_fk" FOREIGN KEY ("order_item_id") REFERENCES "public"."order_items"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "refund_items_refund_item" ON "refund_items" USING btree ("refund_id","order_item_id");--> statement-breakpoint
CREATE INDEX "refund_items_order_item" ON "refund_items" USING btree ("order_item_id");--> statement-breakpoint
ALTER TABLE "orders" ADD CONSTRAINT "orders_checkout_key_unique" UNIQUE("checkout_key");--> statement-breakpoint
-- A refund asked for before per-item restocking, still waiting for the payment service, restocked the
-- whole order once: give its first such refund per order those items, so the confirmation still does it.
INSERT INTO "refund_items" ("refund_id", "order_item_id", "quantity")
SELECT r."id", oi."id", oi."quantity" FROM "refunds" r
JOIN "orders" o ON o."id" = r."order_id"
JOIN "order_items" oi ON oi."order_id" = r."order_id"
WHERE r."restock" AND r."status" <> 'succeeded' AND o."stock_released_at" IS NULL
  AND oi."product_id" IS NOT NULL AND NOT oi."made_to_order" AND oi."kind" <> 'custom'
  AND r."id" = (SELECT min(r2."id") FROM "refunds" r2 WHERE r2."order_id" = r."order_id" AND r2."restock" AND r2."status" <> 'succeeded')
ON CONFLICT DO NOTHING;
