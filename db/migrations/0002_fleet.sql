CREATE TYPE "public"."instrument_kind" AS ENUM('level', 'indicator');--> statement-breakpoint
CREATE TYPE "public"."visit_state" AS ENUM('scheduled', 'in_progress', 'completed', 'cancelled');--> statement-breakpoint
CREATE TABLE "contacts" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organisation_id" uuid NOT NULL,
	"customer_id" uuid NOT NULL,
	"name" text NOT NULL,
	"email" text DEFAULT '' NOT NULL,
	"phone" text DEFAULT '' NOT NULL,
	"position" text DEFAULT '' NOT NULL,
	"receives_reports" boolean DEFAULT false NOT NULL
);
--> statement-breakpoint
CREATE TABLE "due_reminders" (
	"machine_id" uuid NOT NULL,
	"due_on" date NOT NULL,
	"sent_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "due_reminders_machine_id_due_on_pk" PRIMARY KEY("machine_id","due_on")
);
--> statement-breakpoint
CREATE TABLE "instruments" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organisation_id" uuid NOT NULL,
	"kind" "instrument_kind" NOT NULL,
	"model" text NOT NULL,
	"serial" text NOT NULL,
	"sensitivity_value" double precision,
	"sensitivity_unit" text,
	"vial_count" integer,
	"resolution_um" double precision,
	"range_mm" double precision,
	"calibrated_on" date,
	"calibration_due" date NOT NULL,
	"certificate_key" text,
	"certificate_name" text,
	"certificate_type" text,
	"certificate_bytes" integer,
	"active" boolean DEFAULT true NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "invitations" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organisation_id" uuid NOT NULL,
	"email" text NOT NULL,
	"role" "role" NOT NULL,
	"token_hash" text NOT NULL,
	"invited_by_id" uuid NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"accepted_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "invitations_token_hash_unique" UNIQUE("token_hash")
);
--> statement-breakpoint
CREATE TABLE "visit_instruments" (
	"visit_id" uuid NOT NULL,
	"instrument_id" uuid NOT NULL,
	"override_reason" text,
	"override_by_id" uuid,
	"override_at" timestamp with time zone,
	CONSTRAINT "visit_instruments_visit_id_instrument_id_pk" PRIMARY KEY("visit_id","instrument_id")
);
--> statement-breakpoint
CREATE TABLE "visits" (
	"id" uuid PRIMARY KEY DEFAULT gen_random_uuid() NOT NULL,
	"organisation_id" uuid NOT NULL,
	"machine_id" uuid NOT NULL,
	"technician_id" uuid NOT NULL,
	"expert_id" uuid,
	"scheduled_for" timestamp with time zone NOT NULL,
	"state" "visit_state" DEFAULT 'scheduled' NOT NULL,
	"notes" text DEFAULT '' NOT NULL,
	"created_by_id" uuid NOT NULL,
	"reminder_sent_at" timestamp with time zone,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "customers" ADD COLUMN "notes" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "leveling_sessions" ADD COLUMN "visit_id" uuid;--> statement-breakpoint
ALTER TABLE "leveling_sessions" ADD COLUMN "approved_at" timestamp with time zone;--> statement-breakpoint
ALTER TABLE "machines" ADD COLUMN "prior_leveled_on" date;--> statement-breakpoint
ALTER TABLE "machines" ADD COLUMN "twist_tol_urad" double precision;--> statement-breakpoint
ALTER TABLE "machines" ADD COLUMN "bow_tol_urad" double precision;--> statement-breakpoint
ALTER TABLE "machines" ADD COLUMN "sweep_tol_um" double precision;--> statement-breakpoint
ALTER TABLE "organisations" ADD COLUMN "reminder_days_before" integer DEFAULT 14 NOT NULL;--> statement-breakpoint
ALTER TABLE "screws" ADD COLUMN "thread_tpi" double precision;--> statement-breakpoint
ALTER TABLE "screws" ADD COLUMN "lift_per_turn_mm" double precision;--> statement-breakpoint
ALTER TABLE "sites" ADD COLUMN "access_notes" text DEFAULT '' NOT NULL;--> statement-breakpoint
ALTER TABLE "contacts" ADD CONSTRAINT "contacts_organisation_id_organisations_id_fk" FOREIGN KEY ("organisation_id") REFERENCES "public"."organisations"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "contacts" ADD CONSTRAINT "contacts_customer_id_customers_id_fk" FOREIGN KEY ("customer_id") REFERENCES "public"."customers"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "due_reminders" ADD CONSTRAINT "due_reminders_machine_id_machines_id_fk" FOREIGN KEY ("machine_id") REFERENCES "public"."machines"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "instruments" ADD CONSTRAINT "instruments_organisation_id_organisations_id_fk" FOREIGN KEY ("organisation_id") REFERENCES "public"."organisations"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_organisation_id_organisations_id_fk" FOREIGN KEY ("organisation_id") REFERENCES "public"."organisations"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "invitations" ADD CONSTRAINT "invitations_invited_by_id_users_id_fk" FOREIGN KEY ("invited_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visit_instruments" ADD CONSTRAINT "visit_instruments_visit_id_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."visits"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visit_instruments" ADD CONSTRAINT "visit_instruments_instrument_id_instruments_id_fk" FOREIGN KEY ("instrument_id") REFERENCES "public"."instruments"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visit_instruments" ADD CONSTRAINT "visit_instruments_override_by_id_users_id_fk" FOREIGN KEY ("override_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_organisation_id_organisations_id_fk" FOREIGN KEY ("organisation_id") REFERENCES "public"."organisations"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_machine_id_machines_id_fk" FOREIGN KEY ("machine_id") REFERENCES "public"."machines"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_technician_id_users_id_fk" FOREIGN KEY ("technician_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_expert_id_users_id_fk" FOREIGN KEY ("expert_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "visits" ADD CONSTRAINT "visits_created_by_id_users_id_fk" FOREIGN KEY ("created_by_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "contacts_customer_idx" ON "contacts" USING btree ("customer_id");--> statement-breakpoint
CREATE UNIQUE INDEX "instruments_org_serial_unique" ON "instruments" USING btree ("organisation_id","kind","serial");--> statement-breakpoint
CREATE INDEX "visits_org_scheduled_idx" ON "visits" USING btree ("organisation_id","scheduled_for");--> statement-breakpoint
ALTER TABLE "leveling_sessions" ADD CONSTRAINT "leveling_sessions_visit_id_visits_id_fk" FOREIGN KEY ("visit_id") REFERENCES "public"."visits"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "leveling_sessions_machine_approved_idx" ON "leveling_sessions" USING btree ("machine_id","approved_at");--> statement-breakpoint
CREATE UNIQUE INDEX "machines_org_serial_unique" ON "machines" USING btree ("organisation_id","serial");--> statement-breakpoint
CREATE INDEX "machines_org_model_idx" ON "machines" USING btree ("organisation_id","model");--> statement-breakpoint
CREATE INDEX "machines_site_idx" ON "machines" USING btree ("site_id");