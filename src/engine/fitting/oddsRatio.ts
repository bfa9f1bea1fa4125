/** exp(β), held at the largest finite double when β > ~709.78 so that no record carries Infinity. */
export function oddsRatio(beta: number): number {
  const v = Math.exp(beta);
  return Number.isFinite(v) ? v : Number.MAX_VALUE;
}
