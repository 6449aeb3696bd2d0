// Shape checks shared by the scoring kernels: every score matrix is row-major, one row a node,
// one column a class. A wrong shape would otherwise read past rows silently.

/** Number of rows of a row-major matrix; throws when the length does not fit the column count. */
export function rowCountOf(values: ArrayLike<number>, classCount: number, name: string): number {
  if (!Number.isInteger(classCount) || classCount < 1) {
    throw new RangeError(`${name}: classCount must be a positive integer, got ${classCount}`);
  }
  if (values.length % classCount !== 0) {
    throw new RangeError(`${name}: length ${values.length} is not a multiple of classCount ${classCount}`);
  }
  return values.length / classCount;
}
