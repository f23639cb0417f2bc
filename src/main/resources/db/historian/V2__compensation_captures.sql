-- zbin historian schema, version 2: the fixture's open/short/load captures (each line's compensation-history.jsonl).
CREATE TABLE compensation_captures (
    line        text             NOT NULL,
    at          timestamptz      NOT NULL,
    kind        text             NOT NULL,
    freq_hz     double precision NOT NULL,
    r_ohm       double precision NOT NULL,
    x_ohm       double precision NOT NULL,
    source_file text             NOT NULL,
    source_line bigint           NOT NULL,
    CONSTRAINT compensation_captures_row UNIQUE (line, source_file, source_line)
);
CREATE INDEX compensation_captures_line_at ON compensation_captures (line, at);

-- How old the open and short compensation were when each lot started (NULL: none captured before it).
CREATE VIEW compensation_age_at_lot_start AS
SELECT l.line, l.lot, l.started,
       (SELECT max(c.at) FROM compensation_captures c WHERE c.line = l.line AND c.kind = 'open' AND c.at <= l.started) AS open_at,
       (SELECT max(c.at) FROM compensation_captures c WHERE c.line = l.line AND c.kind = 'short' AND c.at <= l.started) AS short_at,
       l.started - (SELECT max(c.at) FROM compensation_captures c WHERE c.line = l.line AND c.kind IN ('open', 'short') AND c.at <= l.started)
           AS newest_capture_age
FROM lots l;
