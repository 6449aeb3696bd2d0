// Adam over plain Float32Array parameters, with the L2 penalty added to the gradient before
// the moment updates (what PyTorch's Adam does with weight_decay; not the decoupled AdamW).
// Kept outside any tensor library so that every model kind updates its weights the same way.

export interface AdamSettings {
  learningRate: number;
  weightDecay: number;
  beta1?: number;
  beta2?: number;
  epsilon?: number;
}

export class AdamOptimizer {
  private readonly firstMoment: Float32Array[];
  private readonly secondMoment: Float32Array[];
  private step = 0;
  private readonly beta1: number;
  private readonly beta2: number;
  private readonly epsilon: number;

  constructor(
    private readonly parameters: Float32Array[],
    private readonly settings: AdamSettings,
  ) {
    this.firstMoment = parameters.map((p) => new Float32Array(p.length));
    this.secondMoment = parameters.map((p) => new Float32Array(p.length));
    this.beta1 = settings.beta1 ?? 0.9;
    this.beta2 = settings.beta2 ?? 0.999;
    this.epsilon = settings.epsilon ?? 1e-8;
  }

  /** Updates the parameters in place; gradients[i] belongs to parameters[i]. */
  update(gradients: ArrayLike<number>[]): void {
    this.step++;
    const { learningRate, weightDecay } = this.settings;
    const { beta1, beta2, epsilon } = this;
    const correction1 = 1 - Math.pow(beta1, this.step);
    const correction2 = 1 - Math.pow(beta2, this.step);
    const stepSize = learningRate / correction1;
    const sqrtCorrection2 = Math.sqrt(correction2);
    for (let t = 0; t < this.parameters.length; t++) {
      const param = this.parameters[t];
      const grad = gradients[t];
      if (grad.length !== param.length) throw new Error(`Adam: gradient ${t} has ${grad.length} entries, parameter has ${param.length}`);
      const m = this.firstMoment[t];
      const v = this.secondMoment[t];
      for (let i = 0; i < param.length; i++) {
        const g = grad[i] + weightDecay * param[i];
        m[i] = beta1 * m[i] + (1 - beta1) * g;
        v[i] = beta2 * v[i] + (1 - beta2) * g * g;
        param[i] -= (stepSize * m[i]) / (Math.sqrt(v[i]) / sqrtCorrection2 + epsilon);
      }
    }
  }
}
