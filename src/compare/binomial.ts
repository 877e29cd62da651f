/**
 * Chance of a blind-test score under pure guessing: with `trials` independent trials, each right
 * with probability 1/2, P(K >= correct) = sum_{i=correct}^{trials} C(trials, i) / 2^trials
 * (binomial distribution, upper tail). The listening page runs this same function (the build bundles
 * it into the page's script, src/page/listeningPage.ts).
 */
export function binomialTailProbability(correct: number, trials: number): number {
  // Whole numbers expected; trials up to about 1000 (2^-trials must not underflow).
  if (correct <= 0) return 1;
  if (correct > trials) return 0;
  // Probabilities C(n, i) / 2^n by the recurrence C(n, i + 1) = C(n, i) (n - i) / (i + 1).
  let term = Math.pow(0.5, trials);
  let tail = 0;
  for (let i = 0; i <= trials; i++) {
    if (i >= correct) tail += term;
    term = (term * (trials - i)) / (i + 1);
  }
  return Math.min(1, tail);
}
