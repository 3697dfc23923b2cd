// Spelling suggestions for names, units and keywords typed in a file. Base layer: imports nothing.

/** Candidates within edit distance 2 of `word` (letter case ignored), nearest first. */
export function closest(word: string, candidates: readonly string[]): string[] {
  return ranked(word, candidates).map((x) => x.c);
}

/** The candidates nearest to `word`, all of them when several are equally near ("Cu1 or Cu2" for Cu3). */
export function nearest(word: string, candidates: readonly string[]): string[] {
  const r = ranked(word, candidates);
  return r.filter((x) => x.d === r[0]?.d).map((x) => x.c);
}

function ranked(word: string, candidates: readonly string[]): { c: string; d: number }[] {
  const dist = (a: string, b: string): number => {
    const dp = Array.from({ length: a.length + 1 }, (_, i) => [i, ...new Array<number>(b.length).fill(0)]);
    for (let j = 1; j <= b.length; j++) (dp[0] as number[])[j] = j;
    for (let i = 1; i <= a.length; i++)
      for (let j = 1; j <= b.length; j++) {
        const row = dp[i] as number[];
        const prev = dp[i - 1] as number[];
        row[j] = Math.min((prev[j] ?? 0) + 1, (row[j - 1] ?? 0) + 1, (prev[j - 1] ?? 0) + (a[i - 1] === b[j - 1] ? 0 : 1));
      }
    return (dp[a.length] as number[])[b.length] ?? 99;
  };
  return candidates
    .map((c) => ({ c, d: dist(word.toLowerCase(), c.toLowerCase()) }))
    .filter((x) => x.d <= 2)
    .sort((a, b) => a.d - b.d);
}
