-- The cholera alert scan reads a fortnight of cases for the few that can count (suspected
-- cholera, severe dehydration, a death); this index answers it without visiting every row.
CREATE INDEX cases_alert_scan ON cases(created_at, suspected_cholera, severity, outcome,
                                       age_months, status);
