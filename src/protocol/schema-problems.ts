/** Turns ajv's errors into located, worded Problems (one per real mistake, not per schema branch). */
import type { ErrorObject } from 'ajv';
import { error, type Problem } from '../problems/problem.js';
import { didYouMean } from '../util/suggest.js';
import { locate, type SourceDocument } from './document.js';

type Err = ErrorObject<string, Record<string, any>, unknown>;

export function schemaProblems(errors: readonly Err[], source: SourceDocument): Problem[] {
  return collapse(errors).map((e) => toProblem(e, source));
}

function pathOf(instancePath: string): (string | number)[] {
  if (instancePath === '') return [];
  return instancePath
    .slice(1)
    .split('/')
    .map((s) => {
      const t = s.replace(/~1/g, '/').replace(/~0/g, '~');
      return /^\d+$/.test(t) ? Number(t) : t;
    });
}

/** Keep, for each `oneOf`, only the errors of the branch that fits the value's shape. */
function collapse(errors: readonly Err[]): Err[] {
  const wrappers = errors.filter((e) => e.keyword === 'oneOf');
  const dropped = new Set<Err>();
  for (const w of wrappers) {
    const inside = errors.filter(
      (e) =>
        e !== w &&
        e.schemaPath.startsWith(w.schemaPath + '/') &&
        (e.instancePath === w.instancePath || e.instancePath.startsWith(w.instancePath + '/')),
    );
    const branches = (w.schema as Record<string, unknown>[]) ?? [];
    const value = w.data;
    const fit = branches.findIndex((b) => branchFits(b, value));
    for (const e of inside) {
      if (fit === -1 || !e.schemaPath.startsWith(`${w.schemaPath}/${fit}/`)) dropped.add(e);
    }
    if (fit !== -1) dropped.add(w);
  }
  return errors.filter((e) => !dropped.has(e) && e.keyword !== 'if' && e.keyword !== 'allOf');
}

function branchFits(branch: Record<string, unknown>, value: unknown): boolean {
  if (typeof value === 'string') return Array.isArray(branch.enum) || branch.type === 'string';
  if (Array.isArray(value)) return branch.type === 'array';
  if (typeof value === 'number') return branch.type === 'number' || branch.type === 'integer';
  if (value !== null && typeof value === 'object') {
    if (branch.type !== 'object') return false;
    const required = (branch.required as string[] | undefined) ?? [];
    return required.length === 0 || required.some((k) => k in (value as object));
  }
  return false;
}

export function pathName(path: readonly (string | number)[]): string {
  if (path.length === 0) return 'the protocol';
  return path.map((s, i) => (typeof s === 'number' ? `[${s}]` : i === 0 ? s : `.${s}`)).join('');
}

function show(v: unknown): string {
  return typeof v === 'string' ? `"${v}"` : JSON.stringify(v);
}

function typeName(v: unknown): string {
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'a list';
  if (typeof v === 'object') return 'a mapping';
  if (typeof v === 'number') return Number.isInteger(v) ? 'an integer' : 'a number';
  return `a ${typeof v}`;
}

function toProblem(e: Err, source: SourceDocument): Problem {
  const path = pathOf(e.instancePath);
  const name = pathName(path);
  const file = source.file;
  const at = (p: (string | number)[], key = false) => ({ file, path: p, position: locate(source, p, key) });
  switch (e.keyword) {
    case 'additionalProperties': {
      const extra = String(e.params.additionalProperty);
      const allowed = Object.keys(((e.parentSchema as Record<string, any>)?.properties ?? {}) as object);
      return error('unknown-key', `unknown key "${extra}" in ${name}`, {
        ...at([...path, extra], true),
        hint: didYouMean(extra, allowed) ?? (allowed.length ? `allowed keys: ${allowed.join(', ')}` : undefined),
      });
    }
    case 'required':
      return error('missing-field', `${name} is missing the required field "${e.params.missingProperty}"`, at(path, true));
    case 'enum': {
      const options = (e.params.allowedValues as unknown[]).map(String);
      return error('not-allowed-value', `${show(e.data)} is not an allowed value of ${name}`, {
        ...at(path),
        hint: (typeof e.data === 'string' ? didYouMean(e.data, options) : undefined) ?? `one of: ${options.join(', ')}`,
      });
    }
    case 'const':
      return error('not-allowed-value', `${name} must be ${show(e.params.allowedValue)}, not ${show(e.data)}`, at(path));
    case 'type':
      return error('wrong-type', `${name} must be ${article(String(e.params.type))}, not ${typeName(e.data)}`, at(path));
    case 'pattern':
      return error('bad-format', `${show(e.data)} is not a valid ${name}`, { ...at(path), hint: patternHint(path) });
    case 'minimum':
    case 'maximum':
    case 'exclusiveMinimum':
    case 'exclusiveMaximum': {
      const op = { minimum: '≥', maximum: '≤', exclusiveMinimum: '>', exclusiveMaximum: '<' }[e.keyword as 'minimum'];
      return error('out-of-range', `${name} must be ${op} ${e.params.limit}, not ${show(e.data)}`, at(path));
    }
    case 'minLength':
      return error('empty-value', `${name} must not be empty`, at(path));
    case 'minItems':
      return error('empty-value', `${name} must list at least ${e.params.limit} item${e.params.limit === 1 ? '' : 's'}`, at(path));
    case 'uniqueItems':
      return error(
        'duplicate-item',
        `${name} lists the same item twice (items ${e.params.j + 1} and ${e.params.i + 1})`,
        at([...path, e.params.i as number]),
      );
    case 'oneOf':
      return error(
        'wrong-shape',
        `${name} has the wrong form: ${String((e.parentSchema as Record<string, any>)?.description ?? 'see docs/protocol.md')}`,
        at(path),
      );
    /* c8 ignore next 2 -- every keyword the protocol schema uses is worded above; this guards future schema edits */
    default:
      return error('schema', `${name} ${e.message ?? 'is invalid'}`, at(path));
  }
}

function article(type: string): string {
  const words: Record<string, string> = {
    integer: 'an integer',
    object: 'a mapping',
    array: 'a list',
    string: 'a string',
    number: 'a number',
    boolean: 'true or false',
  };
  return words[type] ?? type;
}

function patternHint(path: (string | number)[]): string | undefined {
  const last = path[path.length - 1];
  if (last === 'sha256') return 'expected 64 lower-case hex digits; `foldseal hash FILE` prints it';
  if (last === 'name') return 'use lower-case letters, digits and hyphens, starting with a letter or digit';
  return undefined;
}
