-- Facts about this server installation. instance_id tells clients that a database was replaced or
-- restored (a new id), so they can re-push the records they still hold.
CREATE TABLE server_meta (
  key TEXT PRIMARY KEY,
  value TEXT NOT NULL
) STRICT;

INSERT INTO server_meta (key, value) VALUES ('instance_id', lower(hex(randomblob(16))));
INSERT INTO server_meta (key, value) VALUES ('created_at', strftime('%Y-%m-%dT%H:%M:%fZ', 'now'));
