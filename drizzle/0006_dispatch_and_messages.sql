CREATE TYPE "public"."claim_status" AS ENUM('open', 'replaced', 'refunded', 'declined');--> statement-breakpoint
CREATE TYPE "public"."heat_verdict" AS ENUM('ok', 'caution', 'hold');--> statement-breakpoint
CREATE TYPE "public"."message_voice" AS ENUM('maker', 'upload');--> statement-breakpoint
CREATE TYPE "public"."proof_answer" AS ENUM('waiting', 'approved', 'recut');--> statement-breakpoint
CREATE TABLE "claims" (
	"id" serial PRIMARY KEY NOT NULL,
	"order_id" integer NOT NULL,
	"user_id" integer,
	"description" text NOT NULL,
	"item_ids" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"photo_file_ids" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"status" "claim_status" DEFAULT 'open' NOT NULL,
	"resolution_note" text DEFAULT '' NOT NULL,
	"amount_minor" integer,
	"refund_id" integer,
	"resolved_by" integer,
	"resolved_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "custom_messages" (
	"id" serial PRIMARY KEY NOT NULL,
	"order_item_id" integer NOT NULL,
	"occasion" text NOT NULL,
	"recipient_name" text NOT NULL,
	"script" text DEFAULT '' NOT NULL,
	"voice" "message_voice" NOT NULL,
	"voice_file_id" text,
	"voice_seconds" double precision,
	"rpm" integer NOT NULL,
	"rush" boolean DEFAULT false NOT NULL,
	"wished_date" date NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"quote" jsonb NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "custom_messages_order_item_id_unique" UNIQUE("order_item_id")
);
--> statement-breakpoint
CREATE TABLE "heat_checks" (
	"id" serial PRIMARY KEY NOT NULL,
	"order_id" integer NOT NULL,
	"forecast_high" double precision NOT NULL,
	"unit" text NOT NULL,
	"forecast_high_c" double precision NOT NULL,
	"transit_days" integer NOT NULL,
	"verdict" "heat_verdict" NOT NULL,
	"reasons" jsonb NOT NULL,
	"next_ship_date" date NOT NULL,
	"checked_by" integer,
	"checked_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "proofs" (
	"id" serial PRIMARY KEY NOT NULL,
	"ticket_id" integer NOT NULL,
	"file_id" text,
	"note" text DEFAULT '' NOT NULL,
	"answer" "proof_answer" DEFAULT 'waiting' NOT NULL,
	"answer_note" text DEFAULT '' NOT NULL,
	"answered_via" text,
	"answered_by" integer,
	"answered_at" timestamp with time zone,
	"paid_recut" boolean DEFAULT false NOT NULL,
	"reminder_sent_at" timestamp with time zone,
	"uploaded_by" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "shipments" (
	"order_id" integer PRIMARY KEY NOT NULL,
	"packing" jsonb,
	"weighed_g" integer,
	"checklist" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"packed_by" integer,
	"packed_at" timestamp with time zone,
	"carrier" text,
	"tracking_number" text,
	"shipped_by" integer,
	"shipped_at" timestamp with time zone,
	"delivered_at" timestamp with time zone,
	"delivered_via" text
);
--> statement-breakpoint
ALTER TABLE "tickets" ADD COLUMN "recuts" integer DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE "claims" ADD CONSTRAINT "claims_order_id_orders_id_fk" FOREIGN KEY ("order_id") REFERENCES "public"."orders"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "claims" ADD CONSTRAINT "claims_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "claims" ADD CONSTRAINT "claims_refund_id_refunds_id_fk" FOREIGN KEY ("refund_id") REFERENCES "public"."refunds"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "claims" ADD CONSTRAINT "claims_resolved_by_users_id_fk" FOREIGN KEY ("resolved_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "custom_messages" ADD CONSTRAINT "custom_messages_order_item_id_order_items_id_fk" FOREIGN KEY ("order_item_id") REFERENCES "public"."order_items"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "custom_messages" ADD CONSTRAINT "custom_messages_voice_file_id_files_id_fk" FOREIGN KEY ("voice_file_id") REFERENCES "public"."files"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "heat_checks" ADD CONSTRAINT "heat_checks_order_id_orders_id_fk" FOREIGN KEY ("order_id") REFERENCES "public"."orders"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "heat_checks" ADD CONSTRAINT "heat_checks_checked_by_users_id_fk" FOREIGN KEY ("checked_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "proofs" ADD CONSTRAINT "proofs_ticket_id_tickets_id_fk" FOREIGN KEY ("ticket_id") REFERENCES "public"."tickets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "proofs" ADD CONSTRAINT "proofs_file_id_files_id_fk" FOREIGN KEY ("file_id") REFERENCES "public"."files"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "proofs" ADD CONSTRAINT "proofs_answered_by_users_id_fk" FOREIGN KEY ("answered_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "proofs" ADD CONSTRAINT "proofs_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shipments" ADD CONSTRAINT "shipments_order_id_orders_id_fk" FOREIGN KEY ("order_id") REFERENCES "public"."orders"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shipments" ADD CONSTRAINT "shipments_packed_by_users_id_fk" FOREIGN KEY ("packed_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "shipments" ADD CONSTRAINT "shipments_shipped_by_users_id_fk" FOREIGN KEY ("shipped_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "claims_order" ON "claims" USING btree ("order_id");--> statement-breakpoint
CREATE INDEX "claims_status" ON "claims" USING btree ("status","created_at");--> statement-breakpoint
CREATE INDEX "heat_checks_order" ON "heat_checks" USING btree ("order_id","checked_at");--> statement-breakpoint
CREATE INDEX "proofs_ticket" ON "proofs" USING btree ("ticket_id","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "proofs_one_waiting" ON "proofs" USING btree ("ticket_id") WHERE "proofs"."answer" = 'waiting';--> statement-breakpoint
CREATE INDEX "shipments_tracking" ON "shipments" USING btree ("tracking_number");