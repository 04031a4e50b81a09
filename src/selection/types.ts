/** A reproducible selection: what re-performance needs to draw the same items again. */
export interface Selection {
  method: 'random' | 'systematic' | 'haphazard';
  /** Algorithm id and its description; the part before ':' is the id (e.g. 'random-v1'). */
  algorithm: string;
  /** The seed (text). Absent for a haphazard selection. */
  seed?: string;
  /** True when the seed was drawn by tolrate because none was given. */
  seedDrawn?: boolean;
  /** N, the number of rows the positions are drawn from. */
  populationSize: number;
  sampleSize: number;
  spares: number;
  /** 0-based row positions: the sample, then the spares, in draw order. */
  positions: number[];
  /** Systematic: the interval r·N/n (a number; see intervalExact). */
  interval?: number;
  /** Systematic: the interval as an exact fraction, e.g. '12650/60' reduced to '1265/6'. */
  intervalExact?: string;
  /** Systematic: each random start (a number of rows, in [0, interval)), in draw order. */
  starts?: number[];
  /** Systematic: each start as an exact fraction u/n. */
  startsExact?: string[];
  /** Haphazard: who chose the items and how. */
  haphazard?: { selectedBy: string; how: string };
  /** A caution to carry into the workpaper (haphazard). */
  note?: string;
}

export interface RandomInput {
  populationSize: number;
  sampleSize: number;
  spares?: number;
  /** Seed text; one is drawn (and recorded) when left out. */
  seed?: string;
}

export interface SystematicInput extends RandomInput {
  /** Number of random starts r (default 1); the sample size must be a multiple of it. */
  starts?: number;
}

/** What `redraw` needs from a recorded selection. */
export interface RecordedSelection {
  method?: string;
  algorithm: string;
  seed?: string;
  sampleSize: number;
  spares?: number;
  /** Systematic: the recorded starts (their number is r), or r itself. */
  starts?: number[] | number;
}
