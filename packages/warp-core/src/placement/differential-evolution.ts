/**
 * Differential evolution, DE/rand/1/bin (Storn & Price, J. Global Optimization 11 (1997) 341), over a
 * box: a population spread over the whole box, each member challenged by a trial vector built from
 * three others, the trial kept when it is not worse. Generic over what a score is: the caller says how
 * to score a point and which of two scores is better. Deterministic for a seed (src/random.ts).
 */
import { seededRandom } from '../random.js';

/** One searched number's range; a periodic one (an azimuth) wraps around instead of bouncing. */
export interface SearchRange {
  lo: number;
  hi: number;
  periodic?: boolean;
}

export interface DifferentialEvolutionOptions<Score> {
  ranges: readonly SearchRange[];
  /** The first member of the population (the rest are drawn uniformly in the box). */
  start: readonly number[];
  /** Scores to compute in all, the first population included. */
  evaluations: number;
  seed: number;
  populationSize: number;
  /** Differential weight F (0.6: a middle value of Storn & Price's recommended 0.5–1). */
  differentialWeight?: number;
  /** Crossover probability CR (0.9: Storn & Price's suggestion for coupled parameters). */
  crossover?: number;
  score: (point: readonly number[]) => Score;
  /** True when score a beats score b. */
  better: (a: Score, b: Score) => boolean;
}

export interface ScoredPoint<Score> {
  point: number[];
  score: Score;
}

export interface DifferentialEvolutionResult<Score> {
  /** Every point scored, in the order scored. */
  archive: ScoredPoint<Score>[];
  evaluations: number;
}

/** A whole number in [0, size) other than the ones in `not`. */
function drawOther(random: () => number, size: number, not: readonly number[]): number {
  let pick: number;
  do pick = Math.floor(random() * size);
  while (not.includes(pick));
  return pick;
}

/** A trial coordinate that left its range, brought back: wrapped, or bounced between the bound and the parent. */
function keepInRange(value: number, parent: number, range: SearchRange, random: () => number): number {
  const { lo, hi } = range;
  if (range.periodic) return lo + ((((value - lo) % (hi - lo)) + (hi - lo)) % (hi - lo));
  if (value < lo) return lo + random() * (parent - lo);
  if (value > hi) return hi - random() * (hi - parent);
  return value;
}

export function differentialEvolution<Score>(options: DifferentialEvolutionOptions<Score>): DifferentialEvolutionResult<Score> {
  const { ranges, score, better, evaluations, populationSize } = options;
  const weight = options.differentialWeight ?? 0.6;
  const crossover = options.crossover ?? 0.9;
  const random = seededRandom(options.seed);
  const dimensions = ranges.length;
  const members: number[][] = [options.start.slice()];
  while (members.length < populationSize) members.push(ranges.map((range) => range.lo + random() * (range.hi - range.lo)));
  const scores = members.map((point) => score(point));
  let used = populationSize;
  const archive: ScoredPoint<Score>[] = members.map((point, index) => ({ point, score: scores[index] }));
  while (used < evaluations) {
    for (let target = 0; target < populationSize && used < evaluations; target++) {
      const first = drawOther(random, populationSize, [target]);
      const second = drawOther(random, populationSize, [target, first]);
      const third = drawOther(random, populationSize, [target, first, second]);
      const forced = Math.floor(random() * dimensions); // one coordinate always crosses over
      const parent = members[target];
      const trial = parent.slice();
      for (let axis = 0; axis < dimensions; axis++) {
        if (axis !== forced && random() >= crossover) continue;
        const mutant = members[first][axis] + weight * (members[second][axis] - members[third][axis]);
        trial[axis] = keepInRange(mutant, parent[axis], ranges[axis], random);
      }
      const trialScore = score(trial);
      used++;
      archive.push({ point: trial, score: trialScore });
      if (!better(scores[target], trialScore)) {
        members[target] = trial;
        scores[target] = trialScore;
      }
    }
  }
  return { archive, evaluations: used };
}
