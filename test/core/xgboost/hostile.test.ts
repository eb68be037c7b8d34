// Damaged and hostile XGBoost files: each gets one ModelError sentence, never a hang or a crash. Built by editing
// a real model written by XGBoost 1.7.4 (test/fixtures/xgboost/binary.model.json, scripts/xgboost_reference.py).
import { strict as assert } from 'node:assert';
import { readFileSync } from 'node:fs';
import * as path from 'node:path';
import { ModelError } from '../../../src/core/model/validate';
import { looksLikeXgboostStart, readXgboost, XGBOOST_LIMITS } from '../../../src/core/xgboost/read';
import { FIXTURES } from './helpers';

interface Tree {
  left_children: number[];
  right_children: number[];
  split_indices: number[];
  split_conditions: Array<number | string>;
  sum_hessian: number[];
  split_type: number[];
}
interface Doc {
  learner: { objective: { name: string }; gradient_booster: { name: string; model: { trees: Tree[] } }; learner_model_param: { base_score: string } };
  version: number[];
}

function model(): Doc {
  return JSON.parse(readFileSync(path.join(FIXTURES, 'binary.model.json'), 'utf8')) as Doc;
}

function refused(doc: unknown, pattern: RegExp, limits = XGBOOST_LIMITS): void {
  assert.throws(
    () => readXgboost(typeof doc === 'string' ? doc : JSON.stringify(doc), 'm.json', limits),
    (e: unknown) => e instanceof ModelError && pattern.test(e.message) && e.message.split('. ').length === 1,
  );
}

describe('XGBoost JSON models: refusals', () => {
  it('reads the unedited model', () => {
    assert.equal(readXgboost(JSON.stringify(model())).forest.trees.length, 20);
  });

  it('refuses text that is not JSON, and a JSON file without a learner', () => {
    refused('{"learner": [', /is not JSON/);
    refused({ version: [1, 7, 4] }, /no "learner" object/);
  });

  it('refuses an objective it does not score, naming the supported ones', () => {
    const d = model();
    d.learner.objective.name = 'rank:pairwise';
    refused(d, /objective is rank:pairwise; Copse reads binary:logistic, multi:softprob, multi:softmax, reg:squarederror/);
  });

  it('refuses a dart booster', () => {
    const d = model();
    d.learner.gradient_booster.name = 'dart';
    refused(d, /booster is dart/);
  });

  it('refuses a child index outside the tree, and a node reached twice (a cycle)', () => {
    const d = model();
    d.learner.gradient_booster.model.trees[3].left_children[0] = 99;
    refused(d, /tree 3's node 0 has child 99/);
    const e = model();
    const t = e.learner.gradient_booster.model.trees[0];
    t.left_children[1] = 0 + 2; // node 1 points at node 2, which the root also reaches
    refused(e, /reached twice/);
    const f = model();
    f.learner.gradient_booster.model.trees[0].right_children[2] = 0;
    refused(f, /has child 0/);
  });

  it('refuses a feature index past the model, lists of unequal length and non-numbers', () => {
    const d = model();
    d.learner.gradient_booster.model.trees[1].split_indices[0] = 7;
    refused(d, /tests feature 7, outside 0 to 6/);
    const e = model();
    e.learner.gradient_booster.model.trees[1].sum_hessian.pop();
    refused(e, /"sum_hessian" has 14 entries for 15 nodes/);
    const f = model();
    f.learner.gradient_booster.model.trees[1].split_conditions[0] = 'NaN';
    refused(f, /not a finite number/);
  });

  it('refuses categorical splits rather than misread them', () => {
    const d = model();
    d.learner.gradient_booster.model.trees[0].split_type[0] = 1;
    refused(d, /splits on a set of categories/);
  });

  it('bounds trees, nodes and stored values before allocating for them', () => {
    refused(model(), /20 trees, more than the limit of 5/, { ...XGBOOST_LIMITS, maxTrees: 5 });
    refused(model(), /nodes, more than the limit of 100/, { ...XGBOOST_LIMITS, maxNodes: 100 });
    refused(model(), /more than the limit of 1000 characters|characters, more than the limit of 1000/, { ...XGBOOST_LIMITS, maxBytes: 1000 });
  });

  it("reads base_score as later 2.x files write it (a list), and refuses one per target for several targets", () => {
    const d = model();
    d.version = [2, 1, 0];
    d.learner.learner_model_param.base_score = '[5E-1]';
    const a = readXgboost(JSON.stringify(model())).forest;
    const b = readXgboost(JSON.stringify(d)).forest;
    assert.deepEqual(b.boosting, a.boosting);
    assert.deepEqual(Array.from(b.trees[0].value), Array.from(a.trees[0].value));
    d.learner.learner_model_param.base_score = '[5E-1,2E-1]';
    refused(d, /base_score has 2 entries/);
    const e = model();
    e.version = [3, 0, 0];
    refused(e, /written by XGBoost 3\.0\.0; Copse reads files from versions 1 and 2/);
  });

  it('tells an XGBoost file from a Copse model file by its first bytes', () => {
    assert.ok(looksLikeXgboostStart(readFileSync(path.join(FIXTURES, 'binary.model.json'), 'utf8').slice(0, 4096)));
    assert.ok(!looksLikeXgboostStart('{"format":"copse-forest","version":2}'));
  });
});
