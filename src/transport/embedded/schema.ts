// Tables of the embedded store. One SQLite file holds what Kafka holds in distributed mode: the event log
// (partitioned like the topic), the state changelog (materialised: last value per key), the outputs (append-only,
// in publication order) with a compacted view, dead letters, and the positions of the feeds and clocks.

export const SCHEMA_VERSION = 1;

export const DDL = `
CREATE TABLE IF NOT EXISTS meta (key TEXT PRIMARY KEY, value TEXT NOT NULL) WITHOUT ROWID;
CREATE TABLE IF NOT EXISTS event_log (
  part INTEGER NOT NULL, off INTEGER NOT NULL, location TEXT NOT NULL, kind TEXT NOT NULL, record TEXT NOT NULL,
  PRIMARY KEY (part, off)) WITHOUT ROWID;
CREATE TABLE IF NOT EXISTS state (
  part INTEGER NOT NULL, key TEXT NOT NULL, value TEXT NOT NULL,
  PRIMARY KEY (part, key)) WITHOUT ROWID;
CREATE TABLE IF NOT EXISTS outputs (
  seq INTEGER PRIMARY KEY, topic TEXT NOT NULL, key TEXT NOT NULL, location TEXT,
  id TEXT NOT NULL, type TEXT NOT NULL, source TEXT NOT NULL, time TEXT, subject TEXT, dataschema TEXT, data TEXT NOT NULL);
CREATE TABLE IF NOT EXISTS latest (
  topic TEXT NOT NULL, key TEXT NOT NULL, location TEXT, seq INTEGER NOT NULL,
  PRIMARY KEY (topic, key)) WITHOUT ROWID;
CREATE INDEX IF NOT EXISTS latest_by_location ON latest (topic, location, key);
CREATE TABLE IF NOT EXISTS dead_letters (
  key TEXT PRIMARY KEY, seq INTEGER NOT NULL, location TEXT, type TEXT NOT NULL, code TEXT NOT NULL, record TEXT NOT NULL) WITHOUT ROWID;
CREATE TABLE IF NOT EXISTS positions (name TEXT PRIMARY KEY, value TEXT NOT NULL) WITHOUT ROWID;
`;
