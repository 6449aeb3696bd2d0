// Parameter layout of each model kind, fresh initialisation, and warm start from the weights
// of the previous slice. Kernels are stored fanIn × fanOut (row-major), so in the output layer
// each class owns one column; a class that appeared since the previous slice gets a new
// column while the old ones are kept.
import { SeededRandom } from '../util/random';
import { glorotUniform } from './initialisation';
import type { ModelKind, ModelWeights, NamedTensor } from './types';

interface ParameterSpec {
  name: string;
  /** [fanIn, fanOut] for kernels, [fanOut] for biases. */
  shape: number[];
  /** Last axis indexes classes (grows on warm start). */
  perClass: boolean;
}

export function parameterLayout(kind: ModelKind, inputDim: number, hiddenUnits: number, classCount: number): ParameterSpec[] {
  const dense = (name: string, fanIn: number, fanOut: number, perClass: boolean): ParameterSpec[] => [
    { name: `${name}/kernel`, shape: [fanIn, fanOut], perClass },
    { name: `${name}/bias`, shape: [fanOut], perClass },
  ];
  switch (kind) {
    case 'mlp':
    case 'sign':
      return [...dense('hidden', inputDim, hiddenUnits, false), ...dense('output', hiddenUnits, classCount, true)];
    case 'gcn':
      return [...dense('gcn1', inputDim, hiddenUnits, false), ...dense('gcn2', hiddenUnits, classCount, true)];
    case 'sage': {
      const sage = (name: string, fanIn: number, fanOut: number, perClass: boolean): ParameterSpec[] => [
        { name: `${name}/self`, shape: [fanIn, fanOut], perClass },
        { name: `${name}/neighbour`, shape: [fanIn, fanOut], perClass },
        { name: `${name}/bias`, shape: [fanOut], perClass },
      ];
      return [...sage('sage1', inputDim, hiddenUnits, false), ...sage('sage2', hiddenUnits, classCount, true)];
    }
  }
}

export interface InitialWeights {
  weights: ModelWeights;
  notes: string[];
  warmStarted: boolean;
}

/**
 * Fresh Glorot-uniform kernels and zero biases, then, when warmStart fits, the previous
 * values copied over. The fresh draw always happens first so that the random stream (and
 * with it every later dropout mask) is the same with or without a warm start.
 */
export function initialWeights(
  kind: ModelKind,
  inputDim: number,
  hiddenUnits: number,
  classCount: number,
  random: SeededRandom,
  warmStart?: ModelWeights,
): InitialWeights {
  const layout = parameterLayout(kind, inputDim, hiddenUnits, classCount);
  const tensors: NamedTensor[] = layout.map((spec) => ({
    name: spec.name,
    shape: spec.shape.slice(),
    data: spec.shape.length === 2 ? glorotUniform(spec.shape[0], spec.shape[1], random) : new Float32Array(spec.shape[0]),
  }));
  const weights: ModelWeights = { kind, classCount, inputDim, hiddenUnits, tensors };
  if (!warmStart) return { weights, notes: [], warmStarted: false };
  const mismatch = warmStartMismatch(warmStart, kind, inputDim, hiddenUnits, classCount);
  if (mismatch) return { weights, notes: [`cold start: ${mismatch}`], warmStarted: false };
  const previous = new Map(warmStart.tensors.map((t) => [t.name, t]));
  layout.forEach((spec, index) => {
    const old = previous.get(spec.name);
    if (!old) throw new Error(`warm start: weights of kind ${kind} lack tensor ${spec.name}`);
    copyLeadingColumns(old, tensors[index], spec);
  });
  const grown = classCount - warmStart.classCount;
  return { weights, notes: grown > 0 ? [`warm start: ${grown} new class output(s) initialised`] : [], warmStarted: true };
}

function warmStartMismatch(
  previous: ModelWeights,
  kind: ModelKind,
  inputDim: number,
  hiddenUnits: number,
  classCount: number,
): string | null {
  if (previous.kind !== kind) return `previous weights are of kind ${previous.kind}, not ${kind}`;
  if (previous.inputDim !== inputDim) return `input dimension changed from ${previous.inputDim} to ${inputDim}`;
  if (previous.hiddenUnits !== hiddenUnits) return `hidden units changed from ${previous.hiddenUnits} to ${hiddenUnits}`;
  if (previous.classCount > classCount) return `class count shrank from ${previous.classCount} to ${classCount}`;
  return null;
}

/** Copies old into fresh; for per-class tensors only the old (leading) class columns. */
function copyLeadingColumns(old: NamedTensor, fresh: NamedTensor, spec: ParameterSpec): void {
  const oldColumns = old.shape[old.shape.length - 1];
  const newColumns = spec.shape[spec.shape.length - 1];
  const rows = spec.shape.length === 2 ? spec.shape[0] : 1;
  const oldRows = old.shape.length === 2 ? old.shape[0] : 1;
  const fits = oldRows === rows && (spec.perClass ? oldColumns <= newColumns : oldColumns === newColumns);
  if (!fits || old.data.length !== oldRows * oldColumns) {
    throw new Error(`warm start: tensor ${spec.name} has shape [${old.shape.join(', ')}], expected [${spec.shape.join(', ')}]`);
  }
  for (let r = 0; r < rows; r++) {
    fresh.data.set(old.data.subarray(r * oldColumns, (r + 1) * oldColumns), r * newColumns);
  }
}

export function tensorByName(weights: ModelWeights, name: string): NamedTensor {
  const found = weights.tensors.find((t) => t.name === name);
  if (!found) throw new Error(`model weights of kind ${weights.kind} have no tensor ${name}`);
  return found;
}
