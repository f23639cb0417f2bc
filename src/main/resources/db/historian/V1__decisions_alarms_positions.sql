-- zbin historian schema, version 1. Runs as the owner role (migrations, partitions, retention); the ingest role may
-- only INSERT and SELECT (see the README's historian section for the GRANTs).

-- Every decision of every line: one row per record-log row, all its columns, partitioned by day (UTC).
CREATE TABLE decisions (
    line        text             NOT NULL,
    time        timestamptz      NOT NULL,
    lot         text             NOT NULL DEFAULT '',
    seq         bigint,
    part        text             NOT NULL DEFAULT '',
    kind        text             NOT NULL,
    recipe      text             NOT NULL DEFAULT '',
    freq_hz     double precision,
    r_ohm       double precision,
    x_ohm       double precision,
    raw_r_ohm   double precision,
    raw_x_ohm   double precision,
    model       text,
    param       text,
    value       double precision,
    dev_pct     double precision,
    d           double precision,
    q           double precision,
    esr_ohm     double precision,
    theta_deg   double precision,
    bin         integer          NOT NULL,
    grade       text             NOT NULL DEFAULT '',
    verdict     text             NOT NULL,
    reason      text             NOT NULL,
    latency_ms  double precision,
    comp        text,
    attempt     integer,
    readings    integer,
    steps       jsonb,
    source_file text             NOT NULL,  -- the record file and line the row came from (line 1 is the header)
    source_line bigint           NOT NULL,
    -- the presentation's identity: a file read again after a crash writes no second row
    CONSTRAINT decisions_presentation UNIQUE NULLS NOT DISTINCT (line, time, seq, part)
) PARTITION BY RANGE (time);

-- BRIN on time: tiny, and rows arrive in time order; the unique key's B-tree serves line/lot lookups within a day.
CREATE INDEX decisions_time_brin ON decisions USING brin (time);
CREATE INDEX decisions_line_lot ON decisions (line, lot, time);

-- Alarms as the line raised, acknowledged and cleared them (the alarm history file, one row per line of it).
CREATE TABLE alarm_events (
    line        text        NOT NULL,
    code        text        NOT NULL,
    severity    text        NOT NULL,
    active      boolean     NOT NULL,
    message     text        NOT NULL,
    since       timestamptz NOT NULL,
    ack_by      text,
    ack_at      timestamptz,
    ack_note    text,
    source_file text        NOT NULL,
    source_line bigint      NOT NULL,
    CONSTRAINT alarm_events_row UNIQUE (line, source_file, source_line)
);
CREATE INDEX alarm_events_line_since ON alarm_events (line, since);

-- What the historian has committed of each file: one row per batch, written in the batch's own transaction, so the
-- position and the rows it covers are committed together or not at all. Insert-only: resume = the largest end.
CREATE TABLE ingest_batches (
    line        text        NOT NULL,
    file        text        NOT NULL,
    end_offset  bigint      NOT NULL,
    end_line    bigint      NOT NULL,
    rows        integer     NOT NULL,
    at          timestamptz NOT NULL DEFAULT now(),
    PRIMARY KEY (line, file, end_offset)
);

-- Lots as the decisions show them: recipe(s), first and last decision, parts finished, passed and yield.
CREATE VIEW lots AS
SELECT line, lot, min(recipe) AS recipe, count(DISTINCT recipe) AS recipes, min(time) AS started, max(time) AS ended,
       count(*) FILTER (WHERE kind = 'part' AND verdict <> 'retest') AS parts,
       count(*) FILTER (WHERE kind = 'part' AND verdict = 'pass') AS passed,
       count(*) FILTER (WHERE kind = 'part' AND verdict = 'retest') AS retests,
       round(100.0 * count(*) FILTER (WHERE kind = 'part' AND verdict = 'pass')
             / nullif(count(*) FILTER (WHERE kind = 'part' AND verdict <> 'retest'), 0), 2) AS yield_pct
FROM decisions GROUP BY line, lot;

-- Yield by line, hour (UTC) and recipe.
CREATE VIEW yield_by_hour AS
SELECT line, date_trunc('hour', time) AS hour, recipe,
       count(*) FILTER (WHERE kind = 'part' AND verdict <> 'retest') AS parts,
       count(*) FILTER (WHERE kind = 'part' AND verdict = 'pass') AS passed,
       round(100.0 * count(*) FILTER (WHERE kind = 'part' AND verdict = 'pass')
             / nullif(count(*) FILTER (WHERE kind = 'part' AND verdict <> 'retest'), 0), 2) AS yield_pct
FROM decisions GROUP BY line, date_trunc('hour', time), recipe;

-- Alarms raised during each lot (by time: between the lot's first and last decision on its line).
CREATE VIEW alarms_per_lot AS
SELECT l.line, l.lot, a.code, a.severity, a.since, a.message, a.ack_by, a.ack_at, a.ack_note
FROM lots l JOIN alarm_events a ON a.line = l.line AND a.active AND a.ack_by IS NULL AND a.since BETWEEN l.started AND l.ended;

-- The fixture's open, short and reference checks, with their verdicts.
CREATE VIEW compensation_checks AS
SELECT line, time, lot, kind, verdict, reason, r_ohm, x_ohm, freq_hz, comp
FROM decisions WHERE kind IN ('open', 'short', 'reference');
