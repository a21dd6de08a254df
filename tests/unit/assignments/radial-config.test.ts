// The assignment schema's Gaussian radial dictionary (shared/assignment.ts): what it accepts, what it
// refuses and under which field path, the centre rules, and how the task states them. Schema and
// wording checks of this project; no numerical source is involved.
import { describe, expect, it } from 'vitest';
import { assignmentConfig, centreIndices, describeCentreRule, maxDictionaryFunctions, maxRadialCentres, methodConfig, type AssignmentConfigInput } from '../../../shared/assignment';
import { taskCli } from '../../../grading/assignment';

function config(method: unknown): AssignmentConfigInput {
  return {
    title: 'Radial functions on the drift map',
    dueAt: '2031-03-01T17:00:00+01:00',
    datasetId: 1,
    method: method as AssignmentConfigInput['method'],
  };
}

/** path → message of every issue. */
function issues(value: unknown): Record<string, string> {
  const r = assignmentConfig.safeParse(value);
  if (r.success) return {};
  return Object.fromEntries(r.error.issues.map((i) => [i.path.join('.'), i.message]));
}

describe('radial dictionary in the assignment schema', () => {
  it('accepts σ with every s-th snapshot, and σ with listed snapshot indices', () => {
    const every = assignmentConfig.parse(config({ method: 'edmd', dictionary: 'radial', sigma: 0.5, centres: { kind: 'every', step: 20 } }));
    expect(every.method).toEqual({ method: 'edmd', dictionary: 'radial', sigma: 0.5, centres: { kind: 'every', step: 20 } });
    const listed = assignmentConfig.parse(config({ method: 'edmd', dictionary: 'radial', sigma: 2, centres: { kind: 'indices', indices: [3, 0, 17] } }));
    expect(listed.method).toMatchObject({ centres: { kind: 'indices', indices: [3, 0, 17] } });
  });

  it('keeps accepting the polynomial dictionaries as before, and asks them for their degree', () => {
    expect(methodConfig.parse({ method: 'edmd', dictionary: 'monomial', degree: 3 })).toEqual({ method: 'edmd', dictionary: 'monomial', degree: 3 });
    expect(methodConfig.parse({ method: 'edmd', dictionary: 'hermite', degree: 2 })).toMatchObject({ dictionary: 'hermite' });
    expect(issues(config({ method: 'edmd', dictionary: 'hermite' }))).toEqual({ 'method.degree': 'Give the total degree of the dictionary' });
  });

  it('names every missing field of a radial dictionary at once, by its path', () => {
    expect(issues(config({ method: 'edmd', dictionary: 'radial' }))).toEqual({
      'method.sigma': 'Radial functions need their width σ',
      'method.centres': expect.stringContaining('need their centres'),
    });
    // A bad σ and a missing centre rule are both reported (the check runs past the first error).
    const both = issues(config({ method: 'edmd', dictionary: 'radial', sigma: -1 }));
    expect(both['method.sigma']).toBe('σ must be above 0');
    expect(both['method.centres']).toMatch(/every s-th snapshot of X, or a list of snapshot indices/);
  });

  it('refuses σ that is not a positive finite number', () => {
    expect(issues(config({ method: 'edmd', dictionary: 'radial', sigma: 0, centres: { kind: 'every', step: 5 } }))).toEqual({ 'method.sigma': 'σ must be above 0' });
    expect(Object.keys(issues(config({ method: 'edmd', dictionary: 'radial', sigma: Infinity, centres: { kind: 'every', step: 5 } })))).toEqual(['method.sigma']);
    expect(issues(config({ method: 'edmd', dictionary: 'radial', sigma: 'wide', centres: { kind: 'every', step: 5 } }))).toEqual({ 'method.sigma': 'σ must be a number' });
  });

  it('refuses a step below 1 or not whole, under method.centres.step', () => {
    expect(issues(config({ method: 'edmd', dictionary: 'radial', sigma: 1, centres: { kind: 'every', step: 0 } }))).toEqual({ 'method.centres.step': 'The step is at least 1 (every snapshot)' });
    expect(issues(config({ method: 'edmd', dictionary: 'radial', sigma: 1, centres: { kind: 'every', step: 2.5 } }))).toEqual({ 'method.centres.step': 'The step is a whole number' });
  });

  it('refuses negative, fractional, repeated or too many indices, under method.centres.indices', () => {
    const at = (indices: unknown) => issues(config({ method: 'edmd', dictionary: 'radial', sigma: 1, centres: { kind: 'indices', indices } }));
    expect(at([0, -3])).toEqual({ 'method.centres.indices.1': 'Indices start at 0, the first snapshot of X' });
    expect(at([0, 1.5])).toEqual({ 'method.centres.indices.1': 'Snapshot indices are whole numbers' });
    expect(at([4, 9, 4])).toEqual({ 'method.centres.indices': 'Snapshot 4 is listed twice (entries 1 and 3): two equal centres make the dictionary rank-deficient' });
    expect(at([])).toEqual({ 'method.centres.indices': 'Give at least one snapshot index' });
    const tooMany = at(Array.from({ length: maxRadialCentres + 1 }, (_, i) => i));
    expect(tooMany['method.centres.indices']).toBe(`Too many: at most 1999 centres: with the constant function the dictionary may have at most 2000 functions (the engine's limit)`);
    expect(maxDictionaryFunctions).toBe(2000);
    // The limit itself is allowed.
    expect(at(Array.from({ length: maxRadialCentres }, (_, i) => i))).toEqual({});
  });

  it('refuses an unknown centre rule or dictionary with a message that lists the choices', () => {
    expect(issues(config({ method: 'edmd', dictionary: 'radial', sigma: 1, centres: { kind: 'random', count: 5 } }))).toEqual({
      'method.centres.kind': 'Choose how the centres are taken: every s-th snapshot, or a list of snapshot indices',
    });
    expect(issues(config({ method: 'edmd', dictionary: 'wavelet', degree: 2 }))['method.dictionary']).toBe('Choose monomials, Hermite polynomials or Gaussian radial functions');
  });
});

describe('centre rules', () => {
  it('every s-th column of X from the first, and listed columns in their order', () => {
    expect(centreIndices({ kind: 'every', step: 20 }, 100)).toEqual([0, 20, 40, 60, 80]);
    expect(centreIndices({ kind: 'every', step: 3 }, 7)).toEqual([0, 3, 6]);
    expect(centreIndices({ kind: 'every', step: 50 }, 10)).toEqual([0]);
    expect(centreIndices({ kind: 'indices', indices: [9, 2, 5] }, 10)).toEqual([9, 2, 5]);
  });

  it('says the rule in words with 0-based columns', () => {
    expect(describeCentreRule({ kind: 'every', step: 20 }, 100)).toBe('every 20th snapshot of X from the first (0-based columns 0, 20, 40, …; 5 centres)');
    expect(describeCentreRule({ kind: 'every', step: 2 })).toBe('every 2nd snapshot of X from the first (0-based columns 0, 2, 4, …)');
    expect(describeCentreRule({ kind: 'every', step: 1 }, 10)).toBe('every snapshot of X');
    expect(describeCentreRule({ kind: 'indices', indices: [4, 0] })).toBe('the snapshots of X at 0-based columns 4, 0');
  });

  it('the task as spectrum CLI options names the dictionary, σ and the centre rule', () => {
    expect(taskCli({ method: { method: 'edmd', dictionary: 'radial', sigma: 0.5, centres: { kind: 'every', step: 20 } }, order: 'magnitude' }, null)).toBe(
      '--method edmd --dictionary radial --sigma 0.5 --centres-every 20 --order magnitude',
    );
    expect(taskCli({ method: { method: 'edmd', dictionary: 'radial', sigma: 2, centres: { kind: 'indices', indices: [7, 0, 3] } }, dt: 0.1, order: 'magnitude', top: 4 }, 4)).toBe(
      '--method edmd --dictionary radial --sigma 2 --centres-at 7,0,3 --dt 0.1 --order magnitude --top 4',
    );
    expect(taskCli({ method: { method: 'edmd', dictionary: 'monomial', degree: 2 }, order: 'magnitude' }, null)).toBe('--method edmd --dictionary monomial --degree 2 --order magnitude');
  });
});
