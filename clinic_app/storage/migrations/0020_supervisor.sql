-- Supervisor view (issue 7): daily tallies kept in step with the cases by triggers, stock
-- movements, and the alert list.
--
-- Why a summary table: a 12-week tally over a large district must not rescan every case.
-- Each active case adds its counts (view case_tally_rows) to one row keyed by (local day, area, worker, age group,
-- sex); the weekly tallies are a GROUP BY over these rows (storage/tallies.py). The local day is
-- the date written in the case's device time (see clinic_app/surveillance/isoweek.py). The
-- age-group bounds in months repeat clinic_app/surveillance/rules.py AGE_GROUPS;
-- tests/storage/test_tallies.py checks that the two agree on both sides of every bound.
-- The last four counters feed the quality indicators (clinic_app/surveillance/quality.py
-- holds the same definitions over case rows; the tests check that both agree).
CREATE TABLE tally_daily (
    day                        TEXT NOT NULL,
    area                       TEXT NOT NULL,
    user_id                    INTEGER NOT NULL,
    age_group                  TEXT NOT NULL,
    sex                        TEXT NOT NULL,
    cases                      INTEGER NOT NULL DEFAULT 0,
    sev_none                   INTEGER NOT NULL DEFAULT 0,
    sev_some                   INTEGER NOT NULL DEFAULT 0,
    sev_severe                 INTEGER NOT NULL DEFAULT 0,
    plan_a                     INTEGER NOT NULL DEFAULT 0,
    plan_b                     INTEGER NOT NULL DEFAULT 0,
    plan_c                     INTEGER NOT NULL DEFAULT 0,
    plan_sam                   INTEGER NOT NULL DEFAULT 0,
    danger_signs               INTEGER NOT NULL DEFAULT 0,
    referrals_urgent           INTEGER NOT NULL DEFAULT 0,
    referrals_routine          INTEGER NOT NULL DEFAULT 0,
    referrals_completed        INTEGER NOT NULL DEFAULT 0,
    dysentery                  INTEGER NOT NULL DEFAULT 0,
    persistent_diarrhoea       INTEGER NOT NULL DEFAULT 0,
    severe_acute_malnutrition  INTEGER NOT NULL DEFAULT 0,
    suspected_cholera          INTEGER NOT NULL DEFAULT 0,
    outcome_recovered          INTEGER NOT NULL DEFAULT 0,
    outcome_referred           INTEGER NOT NULL DEFAULT 0,
    outcome_admitted           INTEGER NOT NULL DEFAULT 0,
    outcome_died               INTEGER NOT NULL DEFAULT 0,
    outcome_lost               INTEGER NOT NULL DEFAULT 0,
    ors_sachets                INTEGER NOT NULL DEFAULT 0,
    zinc_tablets               INTEGER NOT NULL DEFAULT 0,
    dehydrated_given_ors       INTEGER NOT NULL DEFAULT 0,
    zinc_advised               INTEGER NOT NULL DEFAULT 0,
    zinc_advised_given         INTEGER NOT NULL DEFAULT 0,
    severe_referred_or_plan_c  INTEGER NOT NULL DEFAULT 0,
    PRIMARY KEY (day, area, user_id, age_group, sex)
) WITHOUT ROWID;
CREATE INDEX tally_daily_area_day ON tally_daily(area, day);

-- What one active case adds to its day's row: the only place the counters are defined.
CREATE VIEW case_tally_rows AS
SELECT id,
       substr(created_at, 1, 10) AS day,
       area AS area,
       user_id AS user_id,
       CASE WHEN age_months < 2 THEN 'lt2m' WHEN age_months < 12 THEN 'm2_11'
                WHEN age_months < 60 THEN 'm12_59' WHEN age_months < 180 THEN 'y5_14'
                ELSE 'y15plus' END AS age_group,
       coalesce(sex, '') AS sex,
       (1) AS cases,
       (severity = 'none') AS sev_none,
       (severity = 'some') AS sev_some,
       (severity = 'severe') AS sev_severe,
       (plan = 'A') AS plan_a,
       (plan = 'B') AS plan_b,
       (plan = 'C') AS plan_c,
       (plan = 'SAM') AS plan_sam,
       (danger_sign != 0) AS danger_signs,
       (refer = 'urgent') AS referrals_urgent,
       (refer = 'routine') AS referrals_routine,
       (refer != 'none' AND referral_made != 0) AS referrals_completed,
       (instr(classifications, '"dysentery"') > 0) AS dysentery,
       (instr(classifications, 'persistent_diarrhoea"') > 0) AS persistent_diarrhoea,
       (instr(classifications, '"severe_acute_malnutrition"') > 0) AS severe_acute_malnutrition,
       (suspected_cholera != 0) AS suspected_cholera,
       (coalesce(outcome, '') IN ('recovered', 'recovered_home')) AS outcome_recovered,
       (outcome IS 'referred') AS outcome_referred,
       (outcome IS 'admitted') AS outcome_admitted,
       (outcome IS 'died') AS outcome_died,
       (coalesce(outcome, '') IN ('lost', 'lost_to_follow_up')) AS outcome_lost,
       (ors_sachets) AS ors_sachets,
       (zinc_tablets) AS zinc_tablets,
       (severity IN ('some', 'severe') AND ors_sachets > 0) AS dehydrated_given_ors,
       (json_extract(server_result, '$.zinc') IS NOT NULL) AS zinc_advised,
       (json_extract(server_result, '$.zinc') IS NOT NULL AND zinc_tablets > 0) AS zinc_advised_given,
       (severity = 'severe' AND (referral_made != 0 OR plan = 'C')) AS severe_referred_or_plan_c
FROM cases WHERE status = 'active';

-- Counts leave before a case changes or goes (the view still shows the old row) and come back
-- after it is stored or changed, so an outcome recorded later or a lifted quarantine moves them.
CREATE TRIGGER tally_case_before_update BEFORE UPDATE ON cases
BEGIN
    INSERT INTO tally_daily (day, area, user_id, age_group, sex, cases, sev_none, sev_some, sev_severe,
        plan_a, plan_b, plan_c, plan_sam, danger_signs, referrals_urgent,
        referrals_routine, referrals_completed, dysentery, persistent_diarrhoea,
        severe_acute_malnutrition, suspected_cholera, outcome_recovered,
        outcome_referred, outcome_admitted, outcome_died, outcome_lost, ors_sachets,
        zinc_tablets, dehydrated_given_ors, zinc_advised, zinc_advised_given,
        severe_referred_or_plan_c)
    SELECT day, area, user_id, age_group, sex, -cases, -sev_none, -sev_some, -sev_severe, -plan_a, -plan_b, -plan_c, -plan_sam,
        -danger_signs, -referrals_urgent, -referrals_routine, -referrals_completed,
        -dysentery, -persistent_diarrhoea, -severe_acute_malnutrition,
        -suspected_cholera, -outcome_recovered, -outcome_referred, -outcome_admitted,
        -outcome_died, -outcome_lost, -ors_sachets, -zinc_tablets, -dehydrated_given_ors,
        -zinc_advised, -zinc_advised_given, -severe_referred_or_plan_c
    FROM case_tally_rows WHERE id = OLD.id
    ON CONFLICT (day, area, user_id, age_group, sex) DO UPDATE SET
        cases = cases + excluded.cases, sev_none = sev_none + excluded.sev_none,
        sev_some = sev_some + excluded.sev_some, sev_severe = sev_severe + excluded.sev_severe,
        plan_a = plan_a + excluded.plan_a, plan_b = plan_b + excluded.plan_b,
        plan_c = plan_c + excluded.plan_c, plan_sam = plan_sam + excluded.plan_sam,
        danger_signs = danger_signs + excluded.danger_signs,
        referrals_urgent = referrals_urgent + excluded.referrals_urgent,
        referrals_routine = referrals_routine + excluded.referrals_routine,
        referrals_completed = referrals_completed + excluded.referrals_completed,
        dysentery = dysentery + excluded.dysentery,
        persistent_diarrhoea = persistent_diarrhoea + excluded.persistent_diarrhoea,
        severe_acute_malnutrition = severe_acute_malnutrition + excluded.severe_acute_malnutrition,
        suspected_cholera = suspected_cholera + excluded.suspected_cholera,
        outcome_recovered = outcome_recovered + excluded.outcome_recovered,
        outcome_referred = outcome_referred + excluded.outcome_referred,
        outcome_admitted = outcome_admitted + excluded.outcome_admitted,
        outcome_died = outcome_died + excluded.outcome_died,
        outcome_lost = outcome_lost + excluded.outcome_lost,
        ors_sachets = ors_sachets + excluded.ors_sachets,
        zinc_tablets = zinc_tablets + excluded.zinc_tablets,
        dehydrated_given_ors = dehydrated_given_ors + excluded.dehydrated_given_ors,
        zinc_advised = zinc_advised + excluded.zinc_advised,
        zinc_advised_given = zinc_advised_given + excluded.zinc_advised_given,
        severe_referred_or_plan_c = severe_referred_or_plan_c + excluded.severe_referred_or_plan_c;
END;

CREATE TRIGGER tally_case_before_delete BEFORE DELETE ON cases
BEGIN
    INSERT INTO tally_daily (day, area, user_id, age_group, sex, cases, sev_none, sev_some, sev_severe,
        plan_a, plan_b, plan_c, plan_sam, danger_signs, referrals_urgent,
        referrals_routine, referrals_completed, dysentery, persistent_diarrhoea,
        severe_acute_malnutrition, suspected_cholera, outcome_recovered,
        outcome_referred, outcome_admitted, outcome_died, outcome_lost, ors_sachets,
        zinc_tablets, dehydrated_given_ors, zinc_advised, zinc_advised_given,
        severe_referred_or_plan_c)
    SELECT day, area, user_id, age_group, sex, -cases, -sev_none, -sev_some, -sev_severe, -plan_a, -plan_b, -plan_c, -plan_sam,
        -danger_signs, -referrals_urgent, -referrals_routine, -referrals_completed,
        -dysentery, -persistent_diarrhoea, -severe_acute_malnutrition,
        -suspected_cholera, -outcome_recovered, -outcome_referred, -outcome_admitted,
        -outcome_died, -outcome_lost, -ors_sachets, -zinc_tablets, -dehydrated_given_ors,
        -zinc_advised, -zinc_advised_given, -severe_referred_or_plan_c
    FROM case_tally_rows WHERE id = OLD.id
    ON CONFLICT (day, area, user_id, age_group, sex) DO UPDATE SET
        cases = cases + excluded.cases, sev_none = sev_none + excluded.sev_none,
        sev_some = sev_some + excluded.sev_some, sev_severe = sev_severe + excluded.sev_severe,
        plan_a = plan_a + excluded.plan_a, plan_b = plan_b + excluded.plan_b,
        plan_c = plan_c + excluded.plan_c, plan_sam = plan_sam + excluded.plan_sam,
        danger_signs = danger_signs + excluded.danger_signs,
        referrals_urgent = referrals_urgent + excluded.referrals_urgent,
        referrals_routine = referrals_routine + excluded.referrals_routine,
        referrals_completed = referrals_completed + excluded.referrals_completed,
        dysentery = dysentery + excluded.dysentery,
        persistent_diarrhoea = persistent_diarrhoea + excluded.persistent_diarrhoea,
        severe_acute_malnutrition = severe_acute_malnutrition + excluded.severe_acute_malnutrition,
        suspected_cholera = suspected_cholera + excluded.suspected_cholera,
        outcome_recovered = outcome_recovered + excluded.outcome_recovered,
        outcome_referred = outcome_referred + excluded.outcome_referred,
        outcome_admitted = outcome_admitted + excluded.outcome_admitted,
        outcome_died = outcome_died + excluded.outcome_died,
        outcome_lost = outcome_lost + excluded.outcome_lost,
        ors_sachets = ors_sachets + excluded.ors_sachets,
        zinc_tablets = zinc_tablets + excluded.zinc_tablets,
        dehydrated_given_ors = dehydrated_given_ors + excluded.dehydrated_given_ors,
        zinc_advised = zinc_advised + excluded.zinc_advised,
        zinc_advised_given = zinc_advised_given + excluded.zinc_advised_given,
        severe_referred_or_plan_c = severe_referred_or_plan_c + excluded.severe_referred_or_plan_c;
END;

CREATE TRIGGER tally_case_after_insert AFTER INSERT ON cases
BEGIN
    INSERT INTO tally_daily (day, area, user_id, age_group, sex, cases, sev_none, sev_some, sev_severe,
        plan_a, plan_b, plan_c, plan_sam, danger_signs, referrals_urgent,
        referrals_routine, referrals_completed, dysentery, persistent_diarrhoea,
        severe_acute_malnutrition, suspected_cholera, outcome_recovered,
        outcome_referred, outcome_admitted, outcome_died, outcome_lost, ors_sachets,
        zinc_tablets, dehydrated_given_ors, zinc_advised, zinc_advised_given,
        severe_referred_or_plan_c)
    SELECT day, area, user_id, age_group, sex, cases, sev_none, sev_some, sev_severe, plan_a, plan_b, plan_c, plan_sam,
        danger_signs, referrals_urgent, referrals_routine, referrals_completed,
        dysentery, persistent_diarrhoea, severe_acute_malnutrition, suspected_cholera,
        outcome_recovered, outcome_referred, outcome_admitted, outcome_died,
        outcome_lost, ors_sachets, zinc_tablets, dehydrated_given_ors, zinc_advised,
        zinc_advised_given, severe_referred_or_plan_c
    FROM case_tally_rows WHERE id = NEW.id
    ON CONFLICT (day, area, user_id, age_group, sex) DO UPDATE SET
        cases = cases + excluded.cases, sev_none = sev_none + excluded.sev_none,
        sev_some = sev_some + excluded.sev_some, sev_severe = sev_severe + excluded.sev_severe,
        plan_a = plan_a + excluded.plan_a, plan_b = plan_b + excluded.plan_b,
        plan_c = plan_c + excluded.plan_c, plan_sam = plan_sam + excluded.plan_sam,
        danger_signs = danger_signs + excluded.danger_signs,
        referrals_urgent = referrals_urgent + excluded.referrals_urgent,
        referrals_routine = referrals_routine + excluded.referrals_routine,
        referrals_completed = referrals_completed + excluded.referrals_completed,
        dysentery = dysentery + excluded.dysentery,
        persistent_diarrhoea = persistent_diarrhoea + excluded.persistent_diarrhoea,
        severe_acute_malnutrition = severe_acute_malnutrition + excluded.severe_acute_malnutrition,
        suspected_cholera = suspected_cholera + excluded.suspected_cholera,
        outcome_recovered = outcome_recovered + excluded.outcome_recovered,
        outcome_referred = outcome_referred + excluded.outcome_referred,
        outcome_admitted = outcome_admitted + excluded.outcome_admitted,
        outcome_died = outcome_died + excluded.outcome_died,
        outcome_lost = outcome_lost + excluded.outcome_lost,
        ors_sachets = ors_sachets + excluded.ors_sachets,
        zinc_tablets = zinc_tablets + excluded.zinc_tablets,
        dehydrated_given_ors = dehydrated_given_ors + excluded.dehydrated_given_ors,
        zinc_advised = zinc_advised + excluded.zinc_advised,
        zinc_advised_given = zinc_advised_given + excluded.zinc_advised_given,
        severe_referred_or_plan_c = severe_referred_or_plan_c + excluded.severe_referred_or_plan_c;
END;

CREATE TRIGGER tally_case_after_update AFTER UPDATE ON cases
BEGIN
    INSERT INTO tally_daily (day, area, user_id, age_group, sex, cases, sev_none, sev_some, sev_severe,
        plan_a, plan_b, plan_c, plan_sam, danger_signs, referrals_urgent,
        referrals_routine, referrals_completed, dysentery, persistent_diarrhoea,
        severe_acute_malnutrition, suspected_cholera, outcome_recovered,
        outcome_referred, outcome_admitted, outcome_died, outcome_lost, ors_sachets,
        zinc_tablets, dehydrated_given_ors, zinc_advised, zinc_advised_given,
        severe_referred_or_plan_c)
    SELECT day, area, user_id, age_group, sex, cases, sev_none, sev_some, sev_severe, plan_a, plan_b, plan_c, plan_sam,
        danger_signs, referrals_urgent, referrals_routine, referrals_completed,
        dysentery, persistent_diarrhoea, severe_acute_malnutrition, suspected_cholera,
        outcome_recovered, outcome_referred, outcome_admitted, outcome_died,
        outcome_lost, ors_sachets, zinc_tablets, dehydrated_given_ors, zinc_advised,
        zinc_advised_given, severe_referred_or_plan_c
    FROM case_tally_rows WHERE id = NEW.id
    ON CONFLICT (day, area, user_id, age_group, sex) DO UPDATE SET
        cases = cases + excluded.cases, sev_none = sev_none + excluded.sev_none,
        sev_some = sev_some + excluded.sev_some, sev_severe = sev_severe + excluded.sev_severe,
        plan_a = plan_a + excluded.plan_a, plan_b = plan_b + excluded.plan_b,
        plan_c = plan_c + excluded.plan_c, plan_sam = plan_sam + excluded.plan_sam,
        danger_signs = danger_signs + excluded.danger_signs,
        referrals_urgent = referrals_urgent + excluded.referrals_urgent,
        referrals_routine = referrals_routine + excluded.referrals_routine,
        referrals_completed = referrals_completed + excluded.referrals_completed,
        dysentery = dysentery + excluded.dysentery,
        persistent_diarrhoea = persistent_diarrhoea + excluded.persistent_diarrhoea,
        severe_acute_malnutrition = severe_acute_malnutrition + excluded.severe_acute_malnutrition,
        suspected_cholera = suspected_cholera + excluded.suspected_cholera,
        outcome_recovered = outcome_recovered + excluded.outcome_recovered,
        outcome_referred = outcome_referred + excluded.outcome_referred,
        outcome_admitted = outcome_admitted + excluded.outcome_admitted,
        outcome_died = outcome_died + excluded.outcome_died,
        outcome_lost = outcome_lost + excluded.outcome_lost,
        ors_sachets = ors_sachets + excluded.ors_sachets,
        zinc_tablets = zinc_tablets + excluded.zinc_tablets,
        dehydrated_given_ors = dehydrated_given_ors + excluded.dehydrated_given_ors,
        zinc_advised = zinc_advised + excluded.zinc_advised,
        zinc_advised_given = zinc_advised_given + excluded.zinc_advised_given,
        severe_referred_or_plan_c = severe_referred_or_plan_c + excluded.severe_referred_or_plan_c;
END;

-- Cases stored before this migration.
INSERT INTO tally_daily (day, area, user_id, age_group, sex, cases, sev_none, sev_some, sev_severe, plan_a, plan_b, plan_c, plan_sam, danger_signs, referrals_urgent, referrals_routine, referrals_completed, dysentery, persistent_diarrhoea, severe_acute_malnutrition, suspected_cholera, outcome_recovered, outcome_referred, outcome_admitted, outcome_died, outcome_lost, ors_sachets, zinc_tablets, dehydrated_given_ors, zinc_advised, zinc_advised_given, severe_referred_or_plan_c)
SELECT day, area, user_id, age_group, sex, SUM(cases), SUM(sev_none), SUM(sev_some), SUM(sev_severe), SUM(plan_a), SUM(plan_b), SUM(plan_c), SUM(plan_sam), SUM(danger_signs), SUM(referrals_urgent), SUM(referrals_routine), SUM(referrals_completed), SUM(dysentery), SUM(persistent_diarrhoea), SUM(severe_acute_malnutrition), SUM(suspected_cholera), SUM(outcome_recovered), SUM(outcome_referred), SUM(outcome_admitted), SUM(outcome_died), SUM(outcome_lost), SUM(ors_sachets), SUM(zinc_tablets), SUM(dehydrated_given_ors), SUM(zinc_advised), SUM(zinc_advised_given), SUM(severe_referred_or_plan_c)
FROM case_tally_rows GROUP BY day, area, user_id, age_group, sex;

-- Supplies: receipts and signed adjustments entered by nurses and admins. Consumption is not
-- stored here: it comes from the cases (tally_daily.ors_sachets / zinc_tablets).
CREATE TABLE stock_movements (
    id          INTEGER PRIMARY KEY,
    at          TEXT NOT NULL,
    item        TEXT NOT NULL CHECK (item IN ('ors_sachets', 'zinc_tablets')),
    kind        TEXT NOT NULL CHECK (kind IN ('receipt', 'adjustment')),
    quantity    INTEGER NOT NULL CHECK (kind = 'adjustment' OR quantity > 0),
    user_id     INTEGER NOT NULL REFERENCES users(id),
    reason      TEXT NOT NULL DEFAULT ''
);
CREATE INDEX stock_movements_item ON stock_movements(item, at);

-- Alerts raised by the surveillance rules; one row per alert key, acknowledged with a comment.
CREATE TABLE alerts (
    id               INTEGER PRIMARY KEY,
    key              TEXT NOT NULL UNIQUE,
    kind             TEXT NOT NULL CHECK (kind IN ('cholera_cluster', 'cholera_death', 'ears',
                                                   'low_stock')),
    area             TEXT NOT NULL DEFAULT '',
    week             TEXT NOT NULL DEFAULT '',
    raised_at        TEXT NOT NULL,
    detail           TEXT NOT NULL DEFAULT '{}',
    acknowledged_at  TEXT,
    acknowledged_by  INTEGER REFERENCES users(id),
    comment          TEXT NOT NULL DEFAULT ''
);
CREATE INDEX alerts_open ON alerts(acknowledged_at, raised_at);
