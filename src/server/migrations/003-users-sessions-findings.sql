-- People who may sign in. roles is a JSON array of 'operator', 'mechanic', 'supervisor', 'admin'. The passcode is
-- kept only as a scrypt hash with its own random salt and the cost it was made with (JSON {"N":…,"r":…,"p":…}).
CREATE TABLE users (
  id TEXT PRIMARY KEY,
  name TEXT NOT NULL,
  roles TEXT NOT NULL,
  passcode_salt BLOB NOT NULL,
  passcode_hash BLOB NOT NULL,
  passcode_scrypt TEXT NOT NULL,
  disabled INTEGER NOT NULL DEFAULT 0 CHECK (disabled IN (0, 1)),
  created_at TEXT NOT NULL
) STRICT;

-- Signed-in devices. The bearer token itself is never stored: only its SHA-256 (hex) and its first characters, so a
-- leaked database gives no usable token.
CREATE TABLE sessions (
  token_sha256 TEXT PRIMARY KEY,
  token_prefix TEXT NOT NULL,
  user_id TEXT NOT NULL REFERENCES users (id),
  device_id TEXT NOT NULL,
  device_name TEXT NOT NULL,
  created_at TEXT NOT NULL,
  last_used_at TEXT NOT NULL,
  revoked_at TEXT
) STRICT;

CREATE INDEX sessions_by_user ON sessions (user_id);

-- Disabling a user ends every session they hold.
CREATE TRIGGER users_disabled_revokes_sessions AFTER UPDATE OF disabled ON users
WHEN NEW.disabled = 1 AND OLD.disabled = 0
BEGIN
  UPDATE sessions SET revoked_at = strftime('%Y-%m-%dT%H:%M:%fZ', 'now')
  WHERE user_id = NEW.id AND revoked_at IS NULL;
END;

-- A record sent with the id of a stored record but other content. The stored record never changes; this copy is
-- kept for review. The same conflicting content is kept once.
CREATE TABLE conflicts (
  seq INTEGER PRIMARY KEY AUTOINCREMENT,
  record_id TEXT NOT NULL,
  received_at TEXT NOT NULL,
  author TEXT NOT NULL,
  device TEXT NOT NULL,
  envelope TEXT NOT NULL,
  content_hash TEXT NOT NULL,
  stored_content_hash TEXT NOT NULL,
  UNIQUE (record_id, content_hash)
) STRICT;

-- Every round record, with what the server's own evaluation of it came to: 'done', 'noConfig' (the configuration
-- version it names is not on this server) or 'failed' (the checks threw; the detail went to the log).
CREATE TABLE server_rounds (
  round_id TEXT PRIMARY KEY,
  record_seq INTEGER NOT NULL UNIQUE REFERENCES records (seq),
  author TEXT NOT NULL,
  route_id TEXT NOT NULL,
  config_version INTEGER NOT NULL,
  finished_at TEXT NOT NULL,
  finished_ms INTEGER NOT NULL,
  evaluation TEXT NOT NULL CHECK (evaluation IN ('done', 'noConfig', 'failed')),
  evaluated_at TEXT NOT NULL
) STRICT;

CREATE INDEX server_rounds_by_finish ON server_rounds (finished_ms);
CREATE INDEX server_rounds_by_author ON server_rounds (author);

-- Findings the server computed from a round's readings with the same checks the tablet runs.
CREATE TABLE server_findings (
  id INTEGER PRIMARY KEY,
  round_id TEXT NOT NULL REFERENCES server_rounds (round_id),
  key TEXT NOT NULL,
  rule TEXT NOT NULL,
  machine_id TEXT NOT NULL,
  subject TEXT NOT NULL,
  severity TEXT NOT NULL CHECK (severity IN ('ok', 'watch', 'alarm', 'trip')),
  severity_rank INTEGER NOT NULL,
  message TEXT NOT NULL,
  numbers TEXT NOT NULL,
  round_finished_at TEXT NOT NULL,
  round_finished_ms INTEGER NOT NULL,
  author TEXT NOT NULL
) STRICT;

CREATE INDEX server_findings_by_round ON server_findings (round_id);
CREATE INDEX server_findings_by_time ON server_findings (round_finished_ms, id);
CREATE INDEX server_findings_by_key ON server_findings (key);

-- Where the device's findings of a round (key → severity) differ from the server's: missing on one side (null) or
-- another severity.
CREATE TABLE finding_mismatches (
  id INTEGER PRIMARY KEY,
  round_id TEXT NOT NULL REFERENCES server_rounds (round_id),
  key TEXT NOT NULL,
  rule TEXT NOT NULL,
  device_severity TEXT CHECK (device_severity IN ('ok', 'watch', 'alarm', 'trip')),
  server_severity TEXT CHECK (server_severity IN ('ok', 'watch', 'alarm', 'trip')),
  CHECK (device_severity IS NOT server_severity)
) STRICT;

CREATE INDEX finding_mismatches_by_round ON finding_mismatches (round_id);

-- Review records by the finding they review, so the latest review of a finding is one index lookup.
CREATE TABLE finding_reviews (
  record_seq INTEGER PRIMARY KEY REFERENCES records (seq),
  finding_key TEXT NOT NULL,
  round_id TEXT NOT NULL,
  disposition TEXT NOT NULL,
  by_id TEXT NOT NULL,
  by_name TEXT NOT NULL,
  comment TEXT NOT NULL,
  at TEXT NOT NULL,
  at_ms INTEGER NOT NULL
) STRICT;

CREATE INDEX finding_reviews_by_key ON finding_reviews (finding_key, at_ms, record_seq);
