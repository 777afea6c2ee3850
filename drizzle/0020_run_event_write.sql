-- One step event's write (src/lib/server/runs/commit.ts). It lives in the database because a
-- PL/pgSQL function's statements are planned once per connection: sent as a statement, the same
-- update and insert were parsed and planned again for every event, about a third of the write's
-- cost on PGlite (bench/README.md). It moves the run on and stores the step as number p_seq only
-- while the run still stands where the event was decided (in progress, on p_from_step, newest
-- step p_seq - 1), and returns whether it wrote. A key already stored for the run fails the call
-- as a whole (run_steps_run_key_idx), so nothing of it stays. A BACK also marks the answer it
-- revises (p_revises) as superseded.
CREATE FUNCTION "run_event_write"(
	p_run uuid, p_from_step text, p_seq integer, p_revises bigint,
	p_snapshot jsonb, p_current_step text, p_status text, p_verdict_code text, p_verdict_step text,
	p_data_reachable boolean, p_finished_at timestamptz, p_at timestamptz, p_entered_at timestamptz,
	p_kind text, p_answer jsonb, p_notes text, p_actor uuid, p_key text, p_hash text, p_result jsonb
) RETURNS boolean LANGUAGE plpgsql AS $$
BEGIN
	UPDATE runs SET snapshot = p_snapshot, current_step = p_current_step, status = p_status,
		verdict_code = p_verdict_code, verdict_step = p_verdict_step, data_reachable = p_data_reachable,
		last_seq = p_seq, finished_at = p_finished_at, updated_at = p_at
	WHERE id = p_run AND status = 'in-progress' AND current_step = p_from_step AND last_seq = p_seq - 1;
	IF NOT FOUND THEN
		RETURN false;
	END IF;
	INSERT INTO run_steps (run_id, seq, step_id, kind, answer, notes, actor_id, entered_at, answered_at,
		idempotency_key, body_hash, result)
	VALUES (p_run, p_seq, p_from_step, p_kind, p_answer, p_notes, p_actor, p_entered_at, p_at, p_key,
		p_hash, p_result);
	IF p_revises IS NOT NULL THEN
		UPDATE run_steps SET superseded_at = p_at WHERE id = p_revises;
	END IF;
	RETURN true;
END
$$;
