ALTER TABLE "session_events" DROP CONSTRAINT "session_events_actor_id_users_id_fk";
