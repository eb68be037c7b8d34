// The palette lives in src/protocol/palette.ts, which the panel and the shareable report (src/report) both draw
// with, so a class has one colour wherever it is shown.
export * from '../src/protocol/palette';
