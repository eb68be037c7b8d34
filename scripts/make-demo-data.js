#!/usr/bin/env node
'use strict';
// Generates the demo CSVs in demo/ from two invented scenarios (nothing here describes real data).
// Deterministic: seedrandom with fixed seeds, so re-running and `git diff demo/` shows no change.
//
//   kite-flights.csv               classification, 3 classes, numeric + categorical + boolean + an ID
//   kite-flights.label-errors.json the rows whose label was deliberately flipped, for tests
//   loaf-rise.csv                  regression with missing cells in three columns
//
// usage: node scripts/make-demo-data.js [--out DIR]

const fs = require('fs');
const path = require('path');
const seedrandom = require('seedrandom');

function makeRandom(seed) {
  const rng = seedrandom(seed);
  let spare = null;
  const api = {
    uniform: (lo, hi) => lo + (hi - lo) * rng(),
    int: (lo, hi) => lo + Math.floor(rng() * (hi - lo + 1)),
    chance: (p) => rng() < p,
    pick: (items, weights) => {
      let u = rng() * weights.reduce((a, b) => a + b, 0);
      for (let i = 0; i < items.length; i++) {
        u -= weights[i];
        if (u < 0) return items[i];
      }
      return items[items.length - 1];
    },
    normal: (mean, sd) => {
      if (spare !== null) {
        const s = spare;
        spare = null;
        return mean + sd * s;
      }
      let u = 0;
      while (u === 0) u = rng();
      const v = rng();
      const r = Math.sqrt(-2 * Math.log(u));
      spare = r * Math.sin(2 * Math.PI * v);
      return mean + sd * r * Math.cos(2 * Math.PI * v);
    },
  };
  return api;
}

const round = (x, digits) => Number(x.toFixed(digits));

// ---------------------------------------------------------------------------------------------
// (a) Kite flights. A club logs each test flight of a hand-built kite: wind, line length, build,
// and how the flight went (soared / wobbled / crashed).
//
// The rule, so a reader can check what the forest should find:
//   - For a line of L metres there is an ideal wind 6 + 0.18 L km/h, and a tolerance around it that
//     widens with line length and tail ribbons (mylar sails widen it, paper narrows it). How far
//     the wind is from ideal, in tolerances, is d. In the wind x line plane this is a diagonal band
//     that fans out: the interesting 2-D picture.
//   - Too much wind (d above the frame's limit: pine 1.0, bamboo 1.25, carbon 1.8): crashed.
//     Too little (d < -1): wobbled. In between: soared.
//   - Paper sails at night wobble already at d < -0.3 (damp paper sags).
//   - A gust pocket around 22 km/h with lines near 90 m crashes any kite: an island inside the
//     soared band, visible in the same 2-D view.
//   - d carries a little noise (sd 0.12), so boundaries are soft and accuracy tops out below 100%.
//   - flyer_age plays no part (a test can check its importance is low); flight_id is unique per row.
// Then a few rows deep inside a region (far from every boundary) get a wrong label on purpose.

const FABRICS = ['silk', 'nylon', 'paper', 'mylar'];
const FRAMES = ['bamboo', 'carbon', 'pine'];
const FRAME_LIMIT = { pine: 1.0, bamboo: 1.25, carbon: 1.8 };

function kiteTruth(k, noise) {
  const center = 6 + 0.18 * k.line;
  let width = 3.5 + 0.04 * k.line + 0.6 * k.ribbons;
  if (k.fabric === 'mylar') width *= 1.25;
  if (k.fabric === 'paper') width *= 0.8;
  const d = (k.wind - center) / width + noise;
  const pocket = Math.hypot((k.wind - 22) / 4, (k.line - 90) / 12);
  const limit = FRAME_LIMIT[k.frame];
  const lowEdge = k.night && k.fabric === 'paper' ? -0.3 : -1;
  // margin: how far the point is from the nearest boundary of its own region (d units; the pocket
  // in units of its radius), used to plant label errors only where the truth is unambiguous.
  if (pocket < 1) return { label: 'crashed', margin: 1 - pocket, pocket };
  if (d > limit) return { label: 'crashed', margin: Math.min(pocket - 1, d - limit), pocket };
  if (d < lowEdge) return { label: 'wobbled', margin: Math.min(pocket - 1, lowEdge - d), pocket };
  return { label: 'soared', margin: Math.min(pocket - 1, limit - d, d - lowEdge), pocket };
}

function kiteFlights(rows) {
  const r = makeRandom('copse-demo-kite-flights');
  const records = [];
  const ids = new Set();
  for (let i = 0; i < rows; i++) {
    let id;
    do id = `KF-${String(r.int(10000, 99999))}`;
    while (ids.has(id));
    ids.add(id);
    const k = {
      id,
      wind: round(r.uniform(0, 45), 1),
      line: round(r.uniform(10, 120), 1),
      ribbons: r.int(0, 6),
      fabric: r.pick(FABRICS, [3, 4, 2, 2]),
      frame: r.pick(FRAMES, [4, 2, 3]),
      night: r.chance(0.3),
      age: r.int(8, 72),
    };
    const truth = kiteTruth(k, r.normal(0, 0.12));
    records.push({ ...k, label: truth.label, truth });
  }

  // Planted label errors: spread across classes, each far from any boundary (noise-free margin
  // above 0.6 tolerances) and well clear of the small gust pocket, whose few rows leave a forest
  // unsure, so that a healthy forest is confident the recorded label is wrong.
  const planted = [];
  const wanted = { soared: 4, wobbled: 4, crashed: 4 };
  for (let step = 1; step <= records.length && planted.length < 12; step++) {
    // A prime stride visits every row once, spreading the picks through the file, not the first rows.
    const i = (step * 7919) % records.length;
    const rec = records[i];
    const clean = kiteTruth(rec, 0);
    if (clean.label !== rec.label || clean.margin < 0.6 || clean.pocket < 2.5 || wanted[rec.label] === 0) continue;
    if (planted.some((p) => p.index === i)) continue;
    const others = ['soared', 'wobbled', 'crashed'].filter((c) => c !== rec.label);
    const wrong = others[planted.length % 2];
    wanted[rec.label]--;
    planted.push({ index: i, generated: rec.label, recorded: wrong });
    rec.label = wrong;
  }
  planted.sort((a, b) => a.index - b.index);

  const header = 'flight_id,wind_kmh,line_m,tail_ribbons,sail,frame,night_flight,flyer_age,outcome';
  const lines = [header];
  for (const k of records) {
    lines.push([k.id, k.wind, k.line, k.ribbons, k.fabric, k.frame, k.night ? 'true' : 'false', k.age, k.label].join(','));
  }
  const errors = planted.map((p) => ({
    row: p.index + 1,
    line: p.index + 2,
    flightId: records[p.index].id,
    recorded: p.recorded,
    generated: p.generated,
  }));
  return { csv: lines.join('\n') + '\n', errors, records };
}

// ---------------------------------------------------------------------------------------------
// (b) Loaf rise. A baking class records how many millimetres each loaf rose in the oven.
//   rise = flour base (wheat 45, spelt 38, emmer 32, rye 22)
//        + 25 (1 - exp(-proof / tau)), tau = 90 exp(-(kitchen_temp - 22) / 8) minutes  (warm proofs faster)
//        - 0.08 per minute of over-proofing beyond 2.2 tau
//        - 0.05 (hydration - h0)^2, h0 = 78 for rye, 70 otherwise
//        + 6 ln(starter_age) / ln(60) + 5 if the oven steams + 0.05 (humidity - 60) + N(0, 3)
// Missing cells, at random: humidity_pct 10% (blank: sensor off), starter_age_days 6% (blank),
// flour 4% (written NA). The target is never missing.

const FLOURS = ['wheat', 'spelt', 'rye', 'emmer'];
const FLOUR_BASE = { wheat: 45, spelt: 38, rye: 22, emmer: 32 };

function loafRise(rows) {
  const r = makeRandom('copse-demo-loaf-rise');
  const header = 'proof_minutes,kitchen_temp_c,hydration_pct,flour,starter_age_days,humidity_pct,steam_oven,rise_mm';
  const lines = [header];
  const missing = { humidity_pct: 0, starter_age_days: 0, flour: 0 };
  for (let i = 0; i < rows; i++) {
    const proof = r.int(30, 240);
    const temp = round(Math.min(30, Math.max(15, r.normal(22, 3))), 1);
    const hydration = round(r.uniform(55, 85), 1);
    const flour = r.pick(FLOURS, [8, 5, 4, 3]);
    const starter = r.int(1, 60);
    const humidity = round(r.uniform(30, 90), 0);
    const steam = r.chance(0.5);
    const tau = 90 * Math.exp(-(temp - 22) / 8);
    const h0 = flour === 'rye' ? 78 : 70;
    let rise = FLOUR_BASE[flour] + 25 * (1 - Math.exp(-proof / tau));
    if (proof > 2.2 * tau) rise -= 0.08 * (proof - 2.2 * tau);
    rise += -0.05 * (hydration - h0) ** 2 + (6 * Math.log(starter)) / Math.log(60) + (steam ? 5 : 0) + 0.05 * (humidity - 60);
    rise += r.normal(0, 3);
    const dropHumidity = r.chance(0.1);
    const dropStarter = r.chance(0.06);
    const dropFlour = r.chance(0.04);
    if (dropHumidity) missing.humidity_pct++;
    if (dropStarter) missing.starter_age_days++;
    if (dropFlour) missing.flour++;
    lines.push([
      proof,
      temp,
      hydration,
      dropFlour ? 'NA' : flour,
      dropStarter ? '' : starter,
      dropHumidity ? '' : humidity,
      steam ? 'yes' : 'no',
      round(rise, 1),
    ].join(','));
  }
  return { csv: lines.join('\n') + '\n', missing };
}

function main() {
  const argv = process.argv.slice(2);
  let out = path.join(__dirname, '..', 'demo');
  for (let i = 0; i < argv.length; i += 2) {
    if (argv[i] === '--out' && argv[i + 1]) out = argv[i + 1];
    else throw new Error(`unknown option ${argv[i]}`);
  }
  fs.mkdirSync(out, { recursive: true });

  const kites = kiteFlights(3000);
  fs.writeFileSync(path.join(out, 'kite-flights.csv'), kites.csv);
  const counts = {};
  for (const k of kites.records) counts[k.label] = (counts[k.label] || 0) + 1;
  fs.writeFileSync(
    path.join(out, 'kite-flights.label-errors.json'),
    JSON.stringify(
      {
        file: 'kite-flights.csv',
        target: 'outcome',
        about: 'Rows whose outcome was deliberately recorded wrong by scripts/make-demo-data.js. row is the 1-based data row (header excluded), line the 1-based line in the file.',
        errors: kites.errors,
      },
      null,
      2,
    ) + '\n',
  );
  process.stderr.write(`kite-flights.csv: ${kites.records.length} rows, classes ${JSON.stringify(counts)}, ${kites.errors.length} planted label errors\n`);

  const loaves = loafRise(2000);
  fs.writeFileSync(path.join(out, 'loaf-rise.csv'), loaves.csv);
  process.stderr.write(`loaf-rise.csv: 2000 rows, missing cells ${JSON.stringify(loaves.missing)}\n`);
}

if (require.main === module) main();

module.exports = { kiteFlights, loafRise, kiteTruth };
