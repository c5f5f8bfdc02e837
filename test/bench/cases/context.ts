/** What every benchmark case receives. */
export interface BenchContext {
  /** Small sizes, one run: a smoke test of the script, figures not meaningful. */
  quick: boolean;
  /** A private temporary folder for generated files (removed at the end). */
  tmp: string;
  /** Progress line to stderr. */
  log(message: string): void;
}
