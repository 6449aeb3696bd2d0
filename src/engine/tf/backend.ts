// Chooses and starts the tfjs backend. In Node the wasm backend (SIMD, one thread) is several
// times faster than the pure-JS cpu backend for dense work; its .wasm files are loaded from the
// installed package at run time (tfjs stays outside the bundles, see esbuild.mjs).
import * as tf from '@tensorflow/tfjs';
import { setWasmPaths } from '@tensorflow/tfjs-backend-wasm';
import { dirname, sep } from 'node:path';

export type TensorflowBackend = 'wasm' | 'cpu';

let settingUp: Promise<TensorflowBackend> | undefined;
let settingUpFor: TensorflowBackend | undefined;

/**
 * Makes `preferred` (default wasm) the active backend and resolves to the backend in use: cpu,
 * with a warning on the console, when wasm cannot start. Calling again with the same preference
 * does no work while that backend is still the active one; a different preference switches.
 */
export async function initTensorflow(preferred: TensorflowBackend = 'wasm'): Promise<TensorflowBackend> {
  if (settingUp && settingUpFor === preferred) {
    const backend = await settingUp;
    if (tf.getBackend() === backend) return backend;
  }
  settingUpFor = preferred;
  settingUp = setUp(preferred);
  return settingUp;
}

async function setUp(preferred: TensorflowBackend): Promise<TensorflowBackend> {
  if (preferred === 'wasm') {
    try {
      setWasmPaths(wasmFolder() + sep);
      if (await tf.setBackend('wasm')) {
        await tf.ready();
        return 'wasm';
      }
      console.warn('tfjs: the wasm backend did not start; using the slower cpu backend instead.');
    } catch (error) {
      console.warn(
        `tfjs: the wasm backend could not be set up (${error instanceof Error ? error.message : String(error)}); using the slower cpu backend instead.`,
      );
    }
  }
  if (!(await tf.setBackend('cpu'))) throw new Error('tfjs: neither the wasm nor the cpu backend could be started');
  await tf.ready();
  return 'cpu';
}

/** The folder holding tfjs-backend-wasm.wasm and its SIMD variants, inside the installed package. */
function wasmFolder(): string {
  return dirname(require.resolve('@tensorflow/tfjs-backend-wasm/dist/tfjs-backend-wasm.wasm'));
}
