// Append-only typed arrays for reading files of unknown length without per-row objects.

export class GrowableInt32 {
  private data = new Int32Array(1024);
  length = 0;

  push(value: number): void {
    if (this.length === this.data.length) {
      const bigger = new Int32Array(this.data.length * 2);
      bigger.set(this.data);
      this.data = bigger;
    }
    this.data[this.length++] = value;
  }

  get(index: number): number {
    return this.data[index];
  }

  /** A right-sized copy. */
  toArray(): Int32Array {
    return this.data.slice(0, this.length);
  }
}

export class GrowableFloat32 {
  private data = new Float32Array(1024);
  length = 0;

  push(value: number): void {
    if (this.length === this.data.length) {
      const bigger = new Float32Array(this.data.length * 2);
      bigger.set(this.data);
      this.data = bigger;
    }
    this.data[this.length++] = value;
  }

  toArray(): Float32Array {
    return this.data.slice(0, this.length);
  }
}
