-- session_events is an append-only log: refuse every UPDATE and DELETE, whoever asks.
CREATE FUNCTION session_events_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
  RAISE EXCEPTION 'session_events is append-only: % refused', TG_OP USING ERRCODE = 'insufficient_privilege';
END;
$$;
--> statement-breakpoint
CREATE TRIGGER session_events_append_only BEFORE UPDATE OR DELETE ON session_events
  FOR EACH ROW EXECUTE FUNCTION session_events_refuse_change();
--> statement-breakpoint
CREATE TRIGGER session_events_no_truncate BEFORE TRUNCATE ON session_events
  FOR EACH STATEMENT EXECUTE FUNCTION session_events_refuse_change();
