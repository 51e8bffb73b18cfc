/**
 * A problem found in a survey or a pick table: where it is (JSON pointer into the survey
 * document, e.g. "/shots/2/times/7", or into a pick table, "/csv/line/12/time_ms"), a stable
 * code, and a sentence for a field geophysicist.
 */
export interface Problem {
  path: string;
  code: string;
  message: string;
  /** Pick tables only: the CSV line (1-based) the problem is on. */
  line?: number;
  /** Pick tables only: the CSV column (1-based, in the file's own column order). */
  column?: number;
}
