// The typed settings wrapper, and its agreement with what package.json tells VS Code.
import * as assert from 'node:assert/strict';
import * as fs from 'node:fs';
import * as path from 'node:path';
import { forestParamsFrom, readSettings, SETTING_DEFAULTS, type ConfigSource } from '../../src/extension/settings';

const root = path.resolve(__dirname, '..', '..', '..');
type Property = {
  default: unknown;
  type?: string;
  markdownDescription?: string;
  description?: string;
  minimum?: number;
  maximum?: number;
  exclusiveMinimum?: number;
  exclusiveMaximum?: number;
  enum?: string[];
};
const pkg = JSON.parse(fs.readFileSync(path.join(root, 'package.json'), 'utf8')) as { contributes: { configuration: { properties: Record<string, Property> } } };
const properties = pkg.contributes.configuration.properties;

function source(values: Record<string, unknown>): ConfigSource {
  return { get: <T>(key: string) => values[key] as T | undefined };
}

describe('extension settings', () => {
  it('declares every setting in package.json with the same default and a description', () => {
    const declared = Object.keys(properties).map((k) => k.replace(/^copse\./, '')).sort();
    assert.deepEqual(declared, Object.keys(SETTING_DEFAULTS).sort());
    for (const [key, value] of Object.entries(SETTING_DEFAULTS)) {
      const p = properties[`copse.${key}`];
      assert.deepEqual(p.default, value, `default of copse.${key}`);
      assert.ok((p.markdownDescription ?? p.description ?? '').length > 20, `copse.${key} needs a description`);
    }
  });

  it('states each setting\'s unit and range in its description, with the bounds package.json enforces', () => {
    const written = (n: number) => [String(n), n.toLocaleString('en-US')];
    for (const [key, p] of Object.entries(properties)) {
      const text = p.markdownDescription ?? p.description ?? '';
      if (p.type === 'boolean') {
        assert.match(text, /On or off/, `${key} says it is a switch`);
        continue;
      }
      if (p.enum) {
        for (const v of p.enum) assert.ok(text.includes(`\`${v}\``), `${key} names its choice ${v}`);
        continue;
      }
      if (p.type === 'number' || p.type === 'integer') {
        assert.match(text, /Unit: /, `${key} names its unit`);
        for (const bound of [p.minimum, p.maximum, p.exclusiveMinimum, p.exclusiveMaximum]) {
          if (bound !== undefined) assert.ok(written(bound).some((w) => text.includes(w)), `${key}'s description states its bound ${bound}: ${text}`);
        }
      }
    }
  });

  it('uses camelCase keys under copse. and none of the names other libraries use', () => {
    const banned = /n_estimators|max_features|min_samples|random_state|n_jobs|mtry|ntree|num\.trees|nodesize/i;
    for (const key of Object.keys(properties)) {
      assert.match(key, /^copse\.[a-z]+\.[a-z][A-Za-z]*$/);
      assert.doesNotMatch(key, banned);
    }
  });

  it('reads defaults when nothing is set', () => {
    const { settings, problems } = readSettings(source({}));
    assert.deepEqual(problems, []);
    assert.equal(settings.training.trees, 100);
    assert.equal(settings.training.maxDepth, null, '0 means no depth limit');
    assert.equal(settings.training.featuresPerSplit, 'auto');
    assert.equal(settings.panel.gridResolution, 80);
    assert.equal(settings.explain.intervalLevel, 0.9);
  });

  it('takes an interval level strictly between 0 and 1, else the default', () => {
    assert.equal(readSettings(source({ 'explain.intervalLevel': 0.8 })).settings.explain.intervalLevel, 0.8);
    for (const bad of [0, 1, 1.5, -0.1, '0.9']) {
      const { settings, problems } = readSettings(source({ 'explain.intervalLevel': bad }));
      assert.equal(settings.explain.intervalLevel, 0.9, String(bad));
      assert.match(problems[0], /^copse\.explain\.intervalLevel must be a number in \(0, 1\)/);
    }
  });

  it('replaces out-of-range values by their defaults and says which', () => {
    const { settings, problems } = readSettings(
      source({ 'training.trees': 0, 'training.sampleFraction': 0, 'training.featuresPerSplit': 'most', 'panel.gridResolution': 12.5, 'training.impurity': 'misclass' }),
    );
    assert.equal(settings.training.trees, 100);
    assert.equal(settings.training.sampleFraction, 1);
    assert.equal(settings.training.featuresPerSplit, 'auto');
    assert.equal(settings.panel.gridResolution, 80);
    assert.equal(settings.training.impurity, 'auto');
    assert.equal(problems.length, 5);
    assert.ok(problems.some((p) => p.startsWith('copse.training.trees')));
  });

  it('parses features per split as core does', () => {
    assert.equal(readSettings(source({ 'training.featuresPerSplit': '0.5' })).settings.training.featuresPerSplit, 0.5);
    assert.equal(readSettings(source({ 'training.featuresPerSplit': 'LOG2' })).settings.training.featuresPerSplit, 'log2');
    assert.equal(readSettings(source({ 'training.featuresPerSplit': 3 })).settings.training.featuresPerSplit, 3);
  });

  it('maps settings to core parameters, leaving task defaults alone where the user chose auto', () => {
    const t = readSettings(source({ 'training.maxDepth': 6, 'training.balanceClasses': true, 'training.impurity': 'entropy', 'training.withReplacement': false })).settings.training;
    const c = forestParamsFrom(t, 'classification');
    assert.equal(c.maxDepth, 6);
    assert.equal(c.classWeight, 'balanced');
    assert.equal(c.criterion, 'entropy');
    assert.equal(c.replace, false);
    assert.equal('featuresPerSplit' in c, false);
    const r = forestParamsFrom(t, 'regression');
    assert.equal('criterion' in r, false, 'regression keeps squared error');
    assert.equal('classWeight' in r, false);
  });
});
