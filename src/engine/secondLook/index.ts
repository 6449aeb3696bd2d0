// Second look: doubtful existing labels and what to label next.
export {
  findDoubtfulLabels,
  labelEvidence,
  defaultDoubtFolds,
  defaultNeighbourWeight,
  type DoubtOptions,
  type LabelEvidence,
} from './doubts';
export { suggestLabelNext, marginUncertainty, labelUsefulness, defaultSuggestionCount, type LabelNextOptions } from './labelNext';
export { confidentJoint, averageSelfConfidence, normaliseRows, offDiagonalRows, type ConfidentJoint } from './confidentJoint';
export type { ClassOutput, DoubtfulLabel, DoubtsReport, LabelSuggestion, LabelNextReport } from './reportTypes';
