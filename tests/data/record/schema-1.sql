
CREATE TABLE schema_version (version INTEGER NOT NULL);
CREATE TABLE furnaces (
    id INTEGER PRIMARY KEY,
    name TEXT NOT NULL UNIQUE,
    kind TEXT NOT NULL DEFAULT '',
    survey_class TEXT NOT NULL DEFAULT '',
    notes TEXT NOT NULL DEFAULT ''
);
CREATE TABLE loads (
    id INTEGER PRIMARY KEY,
    furnace_id INTEGER NOT NULL REFERENCES furnaces(id),
    number TEXT NOT NULL,
    date TEXT NOT NULL,
    plan_json TEXT NOT NULL,
    soak_s REAL,
    parts INTEGER,
    notes TEXT NOT NULL DEFAULT '',
    UNIQUE (furnace_id, number)
);
CREATE TABLE measurements (
    id INTEGER PRIMARY KEY,
    load_id INTEGER NOT NULL REFERENCES loads(id) ON DELETE CASCADE,
    coupon TEXT NOT NULL DEFAULT '',
    kind TEXT NOT NULL CHECK (kind IN ('carbon', 'hardness')),
    scale TEXT NOT NULL DEFAULT '',
    measured_by TEXT NOT NULL DEFAULT '',
    taken TEXT NOT NULL DEFAULT ''
);
CREATE TABLE points (
    measurement_id INTEGER NOT NULL REFERENCES measurements(id) ON DELETE CASCADE,
    depth_m REAL NOT NULL,
    value REAL NOT NULL
);
CREATE INDEX points_of_measurement ON points (measurement_id);
INSERT INTO schema_version (version) VALUES (1);

INSERT INTO furnaces (name, kind) VALUES ('Pit 1 (demo)', 'pit');
INSERT INTO loads (furnace_id, number, date, plan_json, soak_s) VALUES (1, 'D-001', '2026-11-02', '{"kind": "casedepth plan", "schema_version": 8, "title": "demo"}', 21600.0);
INSERT INTO measurements (load_id, kind, scale) VALUES (1, 'hardness', 'HV1');
INSERT INTO points VALUES (1, 0.0001, 700), (1, 0.0005, 600), (1, 0.001, 480);
