import * as tf from '@tensorflow/tfjs';
import { setWasmPaths, setThreadsCount } from '@tensorflow/tfjs-backend-wasm';
import { dirname, sep } from 'node:path';
async function main() {
  setWasmPaths(dirname(require.resolve('@tensorflow/tfjs-backend-wasm/dist/tfjs-backend-wasm.wasm')) + sep);
  tf.env().set('WASM_HAS_MULTITHREAD_SUPPORT', true);
  setThreadsCount(2);
  const ok = await tf.setBackend('wasm'); await tf.ready();
  console.log('ok', ok, tf.getBackend());
  const n = 50000, d = 384, h = 64;
  const xt = tf.randomUniform([n, d]) as tf.Tensor2D;
  const w1t = tf.randomUniform([d, h]) as tf.Tensor2D;
  for (let rep = 0; rep < 4; rep++) {
    const t = performance.now();
    const y = tf.matMul(xt, w1t); y.dataSync(); const f = performance.now() - t;
    console.log('fwd', f.toFixed(1), 'GF/s', (2*n*d*h/f/1e6).toFixed(1));
    tf.dispose([y]);
  }
  process.exit(0);
}
main().catch(e => { console.error('ERR', e); process.exit(1); });
