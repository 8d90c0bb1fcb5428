/** One line of the `npm run bench` table. */
export interface BenchRow {
  figure: string;
  value: number;
  unit: string;
  /** What the value is compared with, or how it was measured. */
  note: string;
}

export type Bench = () => Promise<BenchRow[]>;
