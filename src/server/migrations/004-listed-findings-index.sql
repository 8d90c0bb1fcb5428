-- The supervisor's findings list shows only watch-or-worse findings (about 1 in 140 of the stored ones), newest round
-- first. This partial index holds just those, in list order, so the list walks a few thousand entries instead of
-- every finding: about 1,000,000 readings' findings took 25-380 ms per query without it, 0.5-20 ms with it
-- (npm run bench, "findings"). FindingsQuery states "severity_rank >= 1" literally so the planner may use it.
CREATE INDEX server_findings_listed ON server_findings (round_finished_ms, id) WHERE severity_rank >= 1;
