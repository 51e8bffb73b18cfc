/**
 * A problem found in a survey or a pick table: where it is (JSON pointer into the survey
 * document, e.g. "/shots/2/times/7"), a stable code, and a sentence for a field geophysicist.
 */
export interface Problem {
  path: string;
  code: string;
  message: string;
}
