CREATE TABLE "reset_requests" (
	"id" serial PRIMARY KEY NOT NULL,
	"email" text NOT NULL,
	"address" text NOT NULL,
	"at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE INDEX "reset_requests_email" ON "reset_requests" USING btree ("email","at");--> statement-breakpoint
CREATE INDEX "reset_requests_address" ON "reset_requests" USING btree ("address","at");