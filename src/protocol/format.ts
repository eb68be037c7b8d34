// The panel writes numbers with the same formatter as the host and the command line (core/format.ts, which
// imports nothing), so a value reads the same in a hover, the panel and a terminal.
export * from '../core/format';
