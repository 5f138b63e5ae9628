/**
 * Density of a graph given as a square weight (adjacency) matrix: the number of edges present
 * over the number possible. Entry [i][j] (row-major `data[i·N + j]`) is the weight FROM node i TO
 * node j; an edge is present when |w| > tolerance (tolerance 0 → any nonzero weight).
 *
 *     directed:    density = E / (N(N − 1))          (E counts ordered pairs i ≠ j)
 *     undirected:  density = 2E / (N(N − 1)) = E / (N(N − 1)/2)
 *
 * as in the network-science textbooks and NetworkX's `density`. Options:
 *  - `directed` (default true). Undirected counts the pair {i, j} as ONE edge when EITHER direction
 *    is nonzero (w_ij or w_ji), so an asymmetric matrix is symmetrised by "or".
 *  - `selfLoops` (default false): the diagonal is ignored. With true, a nonzero w_ii is an edge and
 *    the N possible self-loops join the denominator (N² directed, N(N + 1)/2 undirected), so the
 *    density stays in [0, 1]. (NetworkX counts self-loops in E but not in the denominator; the two
 *    agree whenever the diagonal is ignored or zero.) A self-loop adds 1 to in- and out-degree.
 *  - `tolerance` (default 0): magnitudes at or below it are absent edges.
 *
 * Returns `{ density, edges, nodes, possible, inDegree, outDegree }`; `density` is null when no
 * edge is possible (N < 2 without self-loops, N = 0). Directed: outDegree[i] = edges leaving i
 * (row i), inDegree[j] = edges entering j (column j). Undirected: both arrays hold the degree.
 *
 * Negative weights are edges (by magnitude). Non-square → `RangeError`. NaN / ±Infinity cells →
 * `RangeError` naming row, column and flat index, unless `nonFinite: 'omit'`: then a non-finite
 * entry is neither an edge nor a non-edge. It is left out of the possible pairs (and of the
 * degrees) and counted in `omitted` (directed: entries; undirected: pairs {i, j} with either
 * entry non-finite; the diagonal only counts with `selfLoops`). Cost: O(N²) time, 8N bytes for
 * the degrees.
 */
import { checkTolerance, nonFiniteCellError } from './check.ts';
import { toDenseMatrix, type MatrixInput } from './matrix.ts';

export interface GraphDensityOptions {
  directed?: boolean;
  selfLoops?: boolean;
  tolerance?: number;
  /** 'throw' (default): a non-finite cell is a RangeError. 'omit': left out of the possible pairs and counted. */
  nonFinite?: 'throw' | 'omit';
}

export interface GraphDensity {
  density: number | null;
  edges: number;
  nodes: number;
  possible: number;
  /** Pairs left out of `possible` because an entry was non-finite (`nonFinite: 'omit'`; else 0). */
  omitted: number;
  inDegree: Int32Array;
  outDegree: Int32Array;
}

export function graphDensity(matrix: MatrixInput, options: GraphDensityOptions = {}): GraphDensity {
  const fn = 'graphDensity';
  const { directed = true, selfLoops = false, tolerance = 0, nonFinite = 'throw' } = options;
  checkTolerance(fn, tolerance);
  const { rows, cols, data } = toDenseMatrix(fn, matrix);
  if (rows !== cols) {
    throw new RangeError(`${fn}: an adjacency matrix must be square (N × N), got ${rows} × ${cols}`);
  }
  const N = rows;
  let anyNonFinite = false;
  for (let p = 0; p < N * N; p++) {
    const v = data[p];
    if (!Number.isFinite(v)) {
      if (nonFinite !== 'omit') throw nonFiniteCellError(fn, p, N, v);
      anyNonFinite = true;
    }
  }
  const ok = (p: number) => !anyNonFinite || Number.isFinite(data[p]);
  let omitted = 0;
  const inDegree = new Int32Array(N);
  const outDegree = new Int32Array(N);
  let edges = 0;
  if (directed) {
    for (let i = 0; i < N; i++) {
      const row = i * N;
      for (let j = 0; j < N; j++) {
        if (i === j && !selfLoops) continue;
        if (!ok(row + j)) {
          omitted++;
          continue;
        }
        if (!(Math.abs(data[row + j]) > tolerance)) continue;
        edges++;
        outDegree[i]++;
        inDegree[j]++;
      }
    }
  } else {
    for (let i = 0; i < N; i++) {
      if (selfLoops && !ok(i * N + i)) omitted++;
      else if (selfLoops && Math.abs(data[i * N + i]) > tolerance) {
        edges++;
        outDegree[i]++;
      }
      for (let j = i + 1; j < N; j++) {
        if (!ok(i * N + j) || !ok(j * N + i)) {
          omitted++;
          continue;
        }
        if (Math.abs(data[i * N + j]) > tolerance || Math.abs(data[j * N + i]) > tolerance) {
          edges++;
          outDegree[i]++;
          outDegree[j]++;
        }
      }
    }
    inDegree.set(outDegree);
  }
  const offDiagonal = directed ? N * (N - 1) : (N * (N - 1)) / 2;
  const possible = offDiagonal + (selfLoops ? N : 0) - omitted;
  return { density: possible === 0 ? null : edges / possible, edges, nodes: N, possible, omitted, inDegree, outDegree };
}
