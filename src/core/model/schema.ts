// The schema types moved to src/core/base/schema.ts (below data/ and forest/, which need them); this name
// stays for callers outside src/core that still import it from here.
export { outputCount, type ColumnKind, type FeatureInfo, type Schema, type TargetInfo } from '../base/schema';
