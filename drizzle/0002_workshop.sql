CREATE TYPE "public"."blank_log_kind" AS ENUM('reaming', 'shaving', 'reshave', 'state', 'note');--> statement-breakpoint
CREATE TYPE "public"."blank_state" AS ENUM('cast', 'reamed', 'shaved', 'tested_pass', 'tested_fail', 'reserved', 'cut', 'shipped', 'scrapped');--> statement-breakpoint
CREATE TYPE "public"."test_verdict" AS ENUM('pass', 'marginal', 'fail');--> statement-breakpoint
CREATE TYPE "public"."ticket_stage" AS ENUM('queued', 'blank_assigned', 'cut', 'proof_sent', 'approved', 'to_dispatch', 'done');--> statement-breakpoint
CREATE TABLE "blank_code_counters" (
	"year" integer PRIMARY KEY NOT NULL,
	"last" integer DEFAULT 0 NOT NULL
);
--> statement-breakpoint
CREATE TABLE "blank_log" (
	"id" serial PRIMARY KEY NOT NULL,
	"blank_id" integer NOT NULL,
	"kind" "blank_log_kind" NOT NULL,
	"data" jsonb NOT NULL,
	"by_user_id" integer,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "blanks" (
	"id" serial PRIMARY KEY NOT NULL,
	"code" text NOT NULL,
	"batch_id" integer NOT NULL,
	"format" "cylinder_format" NOT NULL,
	"state" "blank_state" DEFAULT 'cast' NOT NULL,
	"diameter_in" double precision,
	"surfaces_used" integer DEFAULT 0 NOT NULL,
	"location" text DEFAULT '' NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "blanks_code_unique" UNIQUE("code")
);
--> statement-breakpoint
CREATE TABLE "recorders" (
	"id" serial PRIMARY KEY NOT NULL,
	"name" text NOT NULL,
	"stylus" text DEFAULT '' NOT NULL,
	"horn" text DEFAULT '' NOT NULL,
	"spacer" text DEFAULT '' NOT NULL,
	"condition_notes" text DEFAULT '' NOT NULL,
	"in_service" boolean DEFAULT true NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "recorders_name_unique" UNIQUE("name")
);
--> statement-breakpoint
CREATE TABLE "surface_tests" (
	"id" serial PRIMARY KEY NOT NULL,
	"blank_id" integer NOT NULL,
	"surface" integer NOT NULL,
	"file_id" text,
	"rpm" integer NOT NULL,
	"figures" jsonb NOT NULL,
	"a_weighted_dbfs" double precision NOT NULL,
	"rotary_db" double precision NOT NULL,
	"clicks_per_minute" double precision NOT NULL,
	"computed_verdict" "test_verdict" NOT NULL,
	"final_verdict" text NOT NULL,
	"overrule_reason" text,
	"listening_notes" text DEFAULT '' NOT NULL,
	"tested_by" integer,
	"tested_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "test_cuts" (
	"id" serial PRIMARY KEY NOT NULL,
	"recorder_id" integer NOT NULL,
	"blank_id" integer,
	"file_id" text,
	"figures" jsonb NOT NULL,
	"a_weighted_dbfs" double precision NOT NULL,
	"clicks_per_minute" double precision NOT NULL,
	"verdict" "test_verdict" NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"by_user_id" integer,
	"cut_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "ticket_events" (
	"id" serial PRIMARY KEY NOT NULL,
	"ticket_id" integer NOT NULL,
	"from_stage" "ticket_stage",
	"to_stage" "ticket_stage" NOT NULL,
	"note" text,
	"actor_user_id" integer,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "tickets" (
	"id" serial PRIMARY KEY NOT NULL,
	"order_id" integer NOT NULL,
	"order_item_id" integer NOT NULL,
	"unit" integer NOT NULL,
	"stage" "ticket_stage" DEFAULT 'queued' NOT NULL,
	"format" "cylinder_format" NOT NULL,
	"blank_id" integer,
	"recorder_id" integer,
	"due_date" date,
	"wishes" text DEFAULT '' NOT NULL,
	"cut_at" timestamp with time zone,
	"cut_test_id" integer,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"updated_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "wax_batches" (
	"id" serial PRIMARY KEY NOT NULL,
	"code" text NOT NULL,
	"formula" text NOT NULL,
	"pour_date" date NOT NULL,
	"volumetric_expansion_per_k" double precision NOT NULL,
	"softening_point_c" double precision,
	"notes" text DEFAULT '' NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "wax_batches_code_unique" UNIQUE("code")
);
--> statement-breakpoint
ALTER TABLE "blank_log" ADD CONSTRAINT "blank_log_blank_id_blanks_id_fk" FOREIGN KEY ("blank_id") REFERENCES "public"."blanks"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "blank_log" ADD CONSTRAINT "blank_log_by_user_id_users_id_fk" FOREIGN KEY ("by_user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "blanks" ADD CONSTRAINT "blanks_batch_id_wax_batches_id_fk" FOREIGN KEY ("batch_id") REFERENCES "public"."wax_batches"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "surface_tests" ADD CONSTRAINT "surface_tests_blank_id_blanks_id_fk" FOREIGN KEY ("blank_id") REFERENCES "public"."blanks"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "surface_tests" ADD CONSTRAINT "surface_tests_file_id_files_id_fk" FOREIGN KEY ("file_id") REFERENCES "public"."files"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "surface_tests" ADD CONSTRAINT "surface_tests_tested_by_users_id_fk" FOREIGN KEY ("tested_by") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_cuts" ADD CONSTRAINT "test_cuts_recorder_id_recorders_id_fk" FOREIGN KEY ("recorder_id") REFERENCES "public"."recorders"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_cuts" ADD CONSTRAINT "test_cuts_blank_id_blanks_id_fk" FOREIGN KEY ("blank_id") REFERENCES "public"."blanks"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_cuts" ADD CONSTRAINT "test_cuts_file_id_files_id_fk" FOREIGN KEY ("file_id") REFERENCES "public"."files"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "test_cuts" ADD CONSTRAINT "test_cuts_by_user_id_users_id_fk" FOREIGN KEY ("by_user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ticket_events" ADD CONSTRAINT "ticket_events_ticket_id_tickets_id_fk" FOREIGN KEY ("ticket_id") REFERENCES "public"."tickets"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "ticket_events" ADD CONSTRAINT "ticket_events_actor_user_id_users_id_fk" FOREIGN KEY ("actor_user_id") REFERENCES "public"."users"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tickets" ADD CONSTRAINT "tickets_order_id_orders_id_fk" FOREIGN KEY ("order_id") REFERENCES "public"."orders"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tickets" ADD CONSTRAINT "tickets_order_item_id_order_items_id_fk" FOREIGN KEY ("order_item_id") REFERENCES "public"."order_items"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tickets" ADD CONSTRAINT "tickets_blank_id_blanks_id_fk" FOREIGN KEY ("blank_id") REFERENCES "public"."blanks"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tickets" ADD CONSTRAINT "tickets_recorder_id_recorders_id_fk" FOREIGN KEY ("recorder_id") REFERENCES "public"."recorders"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "tickets" ADD CONSTRAINT "tickets_cut_test_id_test_cuts_id_fk" FOREIGN KEY ("cut_test_id") REFERENCES "public"."test_cuts"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "blank_log_blank" ON "blank_log" USING btree ("blank_id","at");--> statement-breakpoint
CREATE INDEX "blanks_register" ON "blanks" USING btree ("state","format","batch_id");--> statement-breakpoint
CREATE INDEX "blanks_batch" ON "blanks" USING btree ("batch_id");--> statement-breakpoint
CREATE INDEX "surface_tests_blank" ON "surface_tests" USING btree ("blank_id","surface","tested_at");--> statement-breakpoint
CREATE INDEX "test_cuts_recorder" ON "test_cuts" USING btree ("recorder_id","cut_at");--> statement-breakpoint
CREATE INDEX "ticket_events_ticket" ON "ticket_events" USING btree ("ticket_id","at");--> statement-breakpoint
CREATE UNIQUE INDEX "tickets_item_unit" ON "tickets" USING btree ("order_item_id","unit");--> statement-breakpoint
CREATE UNIQUE INDEX "tickets_open_blank" ON "tickets" USING btree ("blank_id") WHERE "tickets"."blank_id" is not null and "tickets"."stage" <> 'done';--> statement-breakpoint
CREATE INDEX "tickets_board" ON "tickets" USING btree ("stage","due_date");