import * as tf from '@tensorflow/tfjs';
import { initTensorflow } from '../src/engine/tf/backend';
async function main() {
  await initTensorflow('wasm');
  const n = 25000, d = 384, h = 64, c = 10;
  const x = tf.randomNormal([n, d]) as tf.Tensor2D; const xT = tf.transpose(x);
  const w1 = tf.randomNormal([d, h]) as tf.Tensor2D; const b1 = tf.zeros([h]) as tf.Tensor1D; const w2 = tf.randomNormal([h, c]) as tf.Tensor2D; const b2 = tf.zeros([c]) as tf.Tensor1D;
  const y = tf.zeros([n, c]) as tf.Tensor2D; const maskData = new Float32Array(n * h).fill(2);
  const w2T = tf.transpose(w2);
  for (let rep = 0; rep < 3; rep++) {
    const t: [string, number][] = []; let last = performance.now();
    const mark = (name: string) => { const now = performance.now(); t.push([name, now - last]); last = now; };
    tf.tidy(() => {
      const hid = tf.fused.matMul({ a: x, b: w1, bias: b1, activation: 'relu' }); mark('fwd1');
      const m = tf.tensor2d(maskData, [n, h]); mark('mask upload');
      const dr = tf.mul(hid, m); mark('mul mask');
      const z = tf.fused.matMul({ a: dr, b: w2, bias: b2 }); mark('fwd2');
      const lt = tf.add(tf.mul(y, z), tf.mul(y, tf.softplus(tf.neg(z)))); const l = tf.sum(lt); l.dataSync(); mark('loss');
      const g = tf.sub(tf.mul(tf.sigmoid(z), y), y); mark('dz');
      const gw2 = tf.matMul(tf.transpose(g), dr); mark('dW2');
      const db2 = tf.sum(g, 0); mark('db2');
      const dh = tf.matMul(g, w2T); mark('dH');
      const dz1 = tf.mul(dh, tf.mul(tf.step(dr), m)); mark('dZ1');
      const gw1 = tf.matMul(xT, dz1); mark('dW1');
      const db1 = tf.sum(dz1, 0); mark('db1');
      gw1.dataSync(); db1.dataSync(); gw2.dataSync(); db2.dataSync(); mark('download');
    });
    console.log(t.map(([k, v]) => `${k} ${v.toFixed(1)}`).join(' | '));
  }
}
main();
