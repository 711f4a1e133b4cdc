/**
 * Evaluation of netlist values in a scope, with errors collected as
 * diagnostics instead of thrown.
 */
import { errorAt, type Diagnostic } from '../errors.js';
import type { CardOrigin, Value } from '../netlist/ast.js';
import { evaluateExpr } from '../netlist/index.js';
import { lookupParam, type Scope } from './scope.js';

/** Evaluates values and collects the problems found. */
export interface Evaluator {
  /** The value of `v` in `scope`; NaN (with an error recorded) when it cannot be evaluated. */
  num(v: Value, scope: Scope): number;
  /** Records an error against a card. */
  fail(card: CardOrigin, code: string, message: string, expected?: string): void;
  /** How many errors have been recorded so far. */
  errorCount(): number;
  /** Sets the card being evaluated, whose line is quoted in value errors. */
  at(card: CardOrigin): void;
  readonly diagnostics: Diagnostic[];
}

/** Creates an evaluator that records into a fresh diagnostic list. */
export function createEvaluator(): Evaluator {
  const diagnostics: Diagnostic[] = [];
  let errors = 0;
  let current: CardOrigin | undefined;
  const lineOf = (file: string, line: number): string | undefined =>
    current && current.pos.file === file && current.pos.line === line ? current.lineText : undefined;
  const push = (d: Diagnostic): void => {
    diagnostics.push(d);
    if (d.severity === 'error') errors++;
  };
  return {
    diagnostics,
    errorCount: () => errors,
    at(card) {
      current = card;
    },
    fail(card, code, message, expected) {
      // An empty line text (a place on a continuation line the card does not quote) is not quoted.
      push(errorAt(code, message, card.pos, card.lineText === '' ? undefined : card.lineText, expected));
    },
    num(v, scope) {
      if (v.kind === 'number') return v.value;
      // A parameter whose own definition failed holds NaN; its error is already reported once.
      let usesFailed = false;
      const r = evaluateExpr(v.expr, (name) => {
        const p = lookupParam(scope, name);
        if (p !== undefined && Number.isNaN(p)) usesFailed = true;
        return p;
      });
      if (r.ok && usesFailed) return Number.NaN;
      if (!r.ok) {
        push(errorAt('undefined-parameter', `parameter '${r.name}' is not defined`, r.pos, lineOf(r.pos.file, r.pos.line), 'a name defined by .param, a subcircuit default or an instance parameter'));
        return Number.NaN;
      }
      if (!Number.isFinite(r.value)) {
        push(errorAt('not-finite', `'${v.text}' evaluates to ${r.value}`, v.pos, lineOf(v.pos.file, v.pos.line), 'a finite number'));
        return Number.NaN;
      }
      return r.value;
    },
  };
}
