-- Published site configurations: each version is kept; the highest is current. The body is the SiteConfig as JSON,
-- validated with src/schema before it is written.
CREATE TABLE site_configs (
  version INTEGER PRIMARY KEY,
  published_at TEXT NOT NULL,
  body TEXT NOT NULL,
  stored_at TEXT NOT NULL
) STRICT;

-- Every record received from a device (or seeded), stored once by its client-made id and numbered in arrival order.
-- content_hash is the SHA-256 of the canonical JSON of the envelope without its id, so a resend is recognised.
CREATE TABLE records (
  seq INTEGER PRIMARY KEY AUTOINCREMENT,
  id TEXT NOT NULL UNIQUE,
  type TEXT NOT NULL,
  schema INTEGER NOT NULL,
  author TEXT NOT NULL,
  device TEXT NOT NULL,
  created_at TEXT NOT NULL,
  received_at TEXT NOT NULL,
  body TEXT NOT NULL,
  content_hash TEXT NOT NULL
) STRICT;

CREATE INDEX records_by_type ON records (type, seq);

-- Records that left a device never change: a correction is a new record.
CREATE TRIGGER records_no_update BEFORE UPDATE ON records
BEGIN
  SELECT RAISE(ABORT, 'records are immutable: store a correcting record instead');
END;

CREATE TRIGGER records_no_delete BEFORE DELETE ON records
BEGIN
  SELECT RAISE(ABORT, 'records are immutable: store a correcting record instead');
END;
