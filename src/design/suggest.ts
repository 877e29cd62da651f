/** "Did you mean" suggestions for misspelt names, by Levenshtein edit distance. */

/** Levenshtein distance (insertions, deletions, substitutions each cost 1), case-insensitive. */
export function editDistance(a: string, b: string): number {
  const left = a.toLowerCase();
  const right = b.toLowerCase();
  let previous = Array.from({ length: right.length + 1 }, (_, j) => j);
  for (let i = 1; i <= left.length; i++) {
    const current = [i];
    for (let j = 1; j <= right.length; j++) {
      const substitution = previous[j - 1]! + (left[i - 1] === right[j - 1] ? 0 : 1);
      current.push(Math.min(previous[j]! + 1, current[j - 1]! + 1, substitution));
    }
    previous = current;
  }
  return previous[right.length]!;
}

/** The closest candidate when it is close enough to be a likely typo, else null. */
export function closestName(name: string, candidates: Iterable<string>): string | null {
  let best: string | null = null;
  let bestDistance = Infinity;
  for (const candidate of candidates) {
    const distance = editDistance(name, candidate);
    if (distance < bestDistance) {
      best = candidate;
      bestDistance = distance;
    }
  }
  const allowed = Math.max(2, Math.floor(name.length / 3));
  return bestDistance <= allowed ? best : null;
}

/** `(did you mean "x"?)` for a near miss, else `(expected one of: a, b, c)`. */
export function suggestionText(name: string, candidates: readonly string[]): string {
  const closest = closestName(name, candidates);
  if (closest !== null) return `(did you mean "${closest}"?)`;
  if (candidates.length === 0) return '(none are defined)';
  return `(expected one of: ${candidates.join(', ')})`;
}
