CREATE TYPE "public"."session_part" AS ENUM('technician', 'expert', 'observer');--> statement-breakpoint
CREATE TABLE "session_participants" (
	"session_id" uuid NOT NULL,
	"user_id" uuid NOT NULL,
	"part" "session_part" NOT NULL,
	"added_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "session_participants_session_id_user_id_pk" PRIMARY KEY("session_id","user_id")
);
--> statement-breakpoint
ALTER TABLE "leveling_sessions" ADD COLUMN "virtual_seed" integer;--> statement-breakpoint
ALTER TABLE "session_participants" ADD CONSTRAINT "session_participants_session_id_leveling_sessions_id_fk" FOREIGN KEY ("session_id") REFERENCES "public"."leveling_sessions"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "session_participants" ADD CONSTRAINT "session_participants_user_id_users_id_fk" FOREIGN KEY ("user_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "session_participants_user_idx" ON "session_participants" USING btree ("user_id");--> statement-breakpoint
INSERT INTO "session_participants" ("session_id", "user_id", "part") SELECT "id", "technician_id", 'technician' FROM "leveling_sessions" ON CONFLICT DO NOTHING;
