/**
 * The NIST StRD regression models as plan expressions (formulas transcribed
 * from the `Model:` block of each file; `**` written as `^`, `arctan` as
 * `atan`, `log` as the natural logarithm `ln`).
 */
import type { Expr } from '../../parser/plan';
import { infix } from './infix';

export interface StrdModel {
  /** Model formula (right-hand side). */
  formula: string;
  /** Response expression over the data columns; default `y`. */
  response?: string;
}

const GAUSS = 'b1*exp(-b2*x) + b3*exp(-(x-b4)^2/b5^2) + b6*exp(-(x-b7)^2/b8^2)';
const LANCZOS = 'b1*exp(-b2*x) + b3*exp(-b4*x) + b5*exp(-b6*x)';
const CUBIC_RATIONAL = '(b1 + b2*x + b3*x^2 + b4*x^3) / (1 + b5*x + b6*x^2 + b7*x^3)';

export const NONLINEAR_MODELS: Readonly<Record<string, StrdModel>> = {
  Misra1a: { formula: 'b1*(1-exp(-b2*x))' },
  Chwirut2: { formula: 'exp(-b1*x)/(b2+b3*x)' },
  Chwirut1: { formula: 'exp(-b1*x)/(b2+b3*x)' },
  Lanczos3: { formula: LANCZOS },
  Gauss1: { formula: GAUSS },
  Gauss2: { formula: GAUSS },
  DanWood: { formula: 'b1*x^b2' },
  Misra1b: { formula: 'b1 * (1-(1+b2*x/2)^(-2))' },
  Kirby2: { formula: '(b1 + b2*x + b3*x^2) / (1 + b4*x + b5*x^2)' },
  Hahn1: { formula: CUBIC_RATIONAL },
  Nelson: { formula: 'b1 - b2*x1 * exp(-b3*x2)', response: 'ln(y)' },
  MGH17: { formula: 'b1 + b2*exp(-x*b4) + b3*exp(-x*b5)' },
  Lanczos1: { formula: LANCZOS },
  Lanczos2: { formula: LANCZOS },
  Gauss3: { formula: GAUSS },
  Misra1c: { formula: 'b1 * (1-(1+2*b2*x)^(-.5))' },
  Misra1d: { formula: 'b1*b2*x*((1+b2*x)^(-1))' },
  Roszman1: { formula: 'b1 - b2*x - atan(b3/(x-b4))/pi' },
  ENSO: {
    formula: 'b1 + b2*cos(2*pi*x/12) + b3*sin(2*pi*x/12) + b5*cos(2*pi*x/b4) + b6*sin(2*pi*x/b4)'
      + ' + b8*cos(2*pi*x/b7) + b9*sin(2*pi*x/b7)',
  },
  MGH09: { formula: 'b1*(x^2+x*b2) / (x^2+x*b3+b4)' },
  Thurber: { formula: CUBIC_RATIONAL },
  BoxBOD: { formula: 'b1*(1-exp(-b2*x))' },
  Rat42: { formula: 'b1 / (1+exp(b2-b3*x))' },
  MGH10: { formula: 'b1 * exp(b2/(x+b3))' },
  Eckerle4: { formula: '(b1/b2) * exp(-0.5*((x-b3)/b2)^2)' },
  Rat43: { formula: 'b1 / ((1+exp(b2-b3*x))^(1/b4))' },
  Bennett5: { formula: 'b1 * (b2+x)^(-1/b3)' },
};

function polynomial(degree: number): string {
  const terms = ['B0'];
  for (let k = 1; k <= degree; k++) terms.push(k === 1 ? 'B1*x' : `B${k}*x^${k}`);
  return terms.join(' + ');
}

export const LINEAR_MODELS: Readonly<Record<string, StrdModel>> = {
  Norris: { formula: polynomial(1) },
  Pontius: { formula: polynomial(2) },
  NoInt1: { formula: 'B1*x' },
  NoInt2: { formula: 'B1*x' },
  Filip: { formula: polynomial(10) },
  Longley: { formula: 'B0 + B1*x1 + B2*x2 + B3*x3 + B4*x4 + B5*x5 + B6*x6' },
  Wampler1: { formula: polynomial(5) },
  Wampler2: { formula: polynomial(5) },
  Wampler3: { formula: polynomial(5) },
  Wampler4: { formula: polynomial(5) },
  Wampler5: { formula: polynomial(5) },
};

export function modelExpr(model: StrdModel, params: readonly string[]): { model: Expr; response: Expr } {
  return { model: infix(model.formula, params), response: infix(model.response ?? 'y', []) };
}
