-- A blade log written by sawplan 0.1 (sqlite-utils migrations m001 + m002), as SQL.
-- Made with the sawplan commands of that release (saw add, blade add/fit/retire,
-- log cut, log event) and dumped with sqlite3's iterdump; the two header pragmas
-- are the ones that release set.  tests/test_store_upgrade.py loads it.
PRAGMA application_id = 1396791120;
PRAGMA user_version = 2;
BEGIN TRANSACTION;
CREATE TABLE "_sqlite_migrations" (
   "id" INTEGER PRIMARY KEY,
   "migration_set" TEXT,
   "name" TEXT,
   "applied_at" TEXT
);
INSERT INTO "_sqlite_migrations" VALUES(1,'sawplan-blade-log','m001_initial','2026-12-02 11:21:07.629775+00:00');
INSERT INTO "_sqlite_migrations" VALUES(2,'sawplan-blade-log','m002_cut_traceability','2026-12-02 11:21:07.630742+00:00');
CREATE TABLE "blades" (
   "id" INTEGER PRIMARY KEY,
   "tag" TEXT NOT NULL,
   "blade_material" TEXT NOT NULL DEFAULT 'bi-metal',
   "grade" TEXT,
   "width_mm" REAL NOT NULL,
   "thickness_mm" REAL NOT NULL,
   "length_mm" REAL,
   "tpi_coarse" REAL NOT NULL,
   "tpi_fine" REAL,
   "tooth_form" TEXT,
   "tooth_set" TEXT,
   "supplier" TEXT,
   "lot" TEXT,
   "price" REAL,
   "bought_on" TEXT,
   "welded" TEXT,
   "status" TEXT NOT NULL DEFAULT 'new',
   "retired_on" TEXT,
   "retire_cause" TEXT,
   "notes" TEXT,
   "added_on" TEXT
) STRICT;
INSERT INTO "blades" VALUES(1,'B-1','bi-metal',NULL,27.0,0.9,3505.0,3.0,4.0,NULL,NULL,'north depot','L-17',60.0,NULL,'bought','removed',NULL,NULL,NULL,'2026-12-02');
INSERT INTO "blades" VALUES(2,'b-2','bi-metal',NULL,34.0,1.1,NULL,2.0,3.0,NULL,NULL,NULL,NULL,88.5,NULL,'bought','retired','2024-01-08','stripped',NULL,'2026-12-02');
INSERT INTO "blades" VALUES(3,'T-3','bi-metal',NULL,27.0,0.9,NULL,4.0,6.0,NULL,NULL,NULL,NULL,NULL,NULL,'bought','fitted',NULL,NULL,NULL,'2026-12-02');
CREATE TABLE "cuts" (
   "id" INTEGER PRIMARY KEY,
   "blade_id" INTEGER NOT NULL REFERENCES "blades"("id"),
   "saw_id" INTEGER REFERENCES "saws"("id"),
   "cut_on" TEXT NOT NULL,
   "material" TEXT NOT NULL,
   "material_group" TEXT,
   "section" TEXT NOT NULL,
   "area_mm2" REAL NOT NULL,
   "pieces" INTEGER NOT NULL,
   "count" INTEGER NOT NULL,
   "band_speed_m_min" REAL,
   "feed_mm_min" REAL,
   "feed_setting" TEXT,
   "time_min" REAL,
   "coolant" INTEGER,
   "job" TEXT,
   "note" TEXT
, "heat" TEXT, "predicted_time_min" REAL) STRICT;
INSERT INTO "cuts" VALUES(1,1,1,'2024-01-03','304','austenitic-stainless','round 60mm',8.48230016469244219468e+03,1,3,NULL,NULL,NULL,9.0,1,'J-1','first','H-11',1.04874275271180685822e+01);
INSERT INTO "cuts" VALUES(2,1,1,'2024-01-04','1045','carbon-steel','flat 100mm 25mm --orient flat',2500.0,1,1,NULL,NULL,NULL,4.0,1,NULL,NULL,NULL,5.15824986796946438616e-01);
INSERT INTO "cuts" VALUES(3,2,1,'2024-01-07','4140','alloy-steel','round 80mm',1.00530964914873384256e+04,1,2,NULL,NULL,NULL,NULL,1,NULL,NULL,NULL,2.89908580902390289324e+00);
INSERT INTO "cuts" VALUES(4,3,1,'2024-01-09','304','austenitic-stainless','round 40mm',1.25663706143591730321e+03,1,1,NULL,NULL,NULL,2.5,1,NULL,'Ø40 bar, ''kept'' for the yard – café',NULL,1.58043264494365254257e+00);
CREATE TABLE "events" (
   "id" INTEGER PRIMARY KEY,
   "blade_id" INTEGER NOT NULL REFERENCES "blades"("id"),
   "happened_on" TEXT NOT NULL,
   "kind" TEXT NOT NULL,
   "mode" TEXT,
   "location" TEXT,
   "teeth" INTEGER,
   "note" TEXT
) STRICT;
INSERT INTO "events" VALUES(1,1,'2024-01-05','teeth-lost',NULL,NULL,2,'two teeth');
INSERT INTO "events" VALUES(2,2,'2024-01-08','failure','stripped',NULL,NULL,NULL);
INSERT INTO "events" VALUES(3,3,'2024-01-10','crooked',NULL,'near the weld',NULL,NULL);
CREATE TABLE "fittings" (
   "id" INTEGER PRIMARY KEY,
   "blade_id" INTEGER NOT NULL REFERENCES "blades"("id"),
   "saw_id" INTEGER NOT NULL REFERENCES "saws"("id"),
   "fitted_on" TEXT NOT NULL,
   "removed_on" TEXT,
   "tension_mpa" REAL,
   "break_in" INTEGER,
   "break_in_how" TEXT
) STRICT;
INSERT INTO "fittings" VALUES(1,1,1,'2024-01-02','2024-01-06',NULL,NULL,NULL);
INSERT INTO "fittings" VALUES(2,2,1,'2024-01-06','2024-01-08',NULL,NULL,NULL);
INSERT INTO "fittings" VALUES(3,3,1,'2024-01-09',NULL,NULL,NULL,NULL);
CREATE TABLE "saws" (
   "id" INTEGER PRIMARY KEY,
   "name" TEXT NOT NULL,
   "kind" TEXT,
   "wheel_diameter_mm" REAL,
   "blade_length_mm" REAL,
   "blade_width_mm" REAL,
   "blade_thickness_mm" REAL,
   "band_speed_min_m_min" REAL,
   "band_speed_max_m_min" REAL,
   "motor_power_w" REAL,
   "drive_efficiency" REAL,
   "capacity_round_mm" REAL,
   "capacity_rect_w_mm" REAL,
   "capacity_rect_h_mm" REAL,
   "feed_type" TEXT,
   "head_force_n" REAL,
   "coolant" INTEGER,
   "wheel_count" INTEGER,
   "notes" TEXT,
   "source" TEXT NOT NULL DEFAULT 'blade log',
   "added_on" TEXT
) STRICT;
INSERT INTO "saws" VALUES(1,'bay 2','horizontal',400.0,3660.0,27.0,0.9,20.0,100.0,1500.0,0.75,260.0,350.0,260.0,'hydraulic',2500.0,1,2,NULL,'like mid-production','2026-12-02');
CREATE UNIQUE INDEX "idx__sqlite_migrations_migration_set_name"
    ON "_sqlite_migrations" ("migration_set", "name");
CREATE UNIQUE INDEX saws_name ON saws (name COLLATE NOCASE);
CREATE UNIQUE INDEX blades_tag ON blades (tag COLLATE NOCASE);
CREATE INDEX "idx_fittings_blade_id"
    ON "fittings" ("blade_id");
CREATE UNIQUE INDEX fittings_open_blade ON fittings (blade_id) WHERE removed_on IS NULL;
CREATE UNIQUE INDEX fittings_open_saw ON fittings (saw_id) WHERE removed_on IS NULL;
CREATE INDEX "idx_cuts_blade_id"
    ON "cuts" ("blade_id");
CREATE INDEX "idx_events_blade_id"
    ON "events" ("blade_id");
CREATE INDEX "idx_cuts_saw_id_material_group"
    ON "cuts" ("saw_id", "material_group");
COMMIT;
