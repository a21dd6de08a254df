/** The scorer's public API (used by the server and the command line). */
export { gradeSubmission, referenceTolerances, type GradeInput } from './score';
export { solveAssignment, matchWithCutoff, type Assignment } from './assignment';
export {
  readSubmission,
  readSubmissionText,
  formatSubmissionError,
  type SubmissionFile,
  type Submission,
  type SubmissionPart,
  type SubmissionError,
  type ReadResult,
  type ReadOptions,
  type ExpectedPart,
} from '../formats/submission';
