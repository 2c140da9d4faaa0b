/**
 * Turns an SdpProblem (plain data) into the solver's internal real form and checks it.
 *
 * - Real symmetric blocks stay as they are; complex Hermitian n×n blocks become real symmetric
 *   2n×2n blocks through the embedding H ↦ [[Re H, −Im H], [Im H, Re H]], with every coefficient
 *   halved so that ⟨emb(A)/2, emb(X)⟩ = Re tr(A X). (Why the embedding and not native complex
 *   arithmetic: one set of real kernels, tested once; the price is about 2× the flops on complex
 *   blocks. The solver does not pay it where it matters: Hermitian blocks also keep their complex
 *   entries (PsdBlock.complex), schur.ts pairs them in complex arithmetic at half the dimension,
 *   and the solver's O(n³) per-block steps run on the complex matrix (complexdense.ts). The
 *   central path of a problem with embedded data keeps the embedded structure, so X and S read
 *   back as Hermitian matrices.)
 * - Matrix coefficients are stored as merged upper-triangle triplets (p ≤ q, value v standing for
 *   both (p,q) and (q,p)); nonnegative and free blocks are concatenated into one orthant vector and
 *   one free vector with sparse rows.
 * - Constraints are grouped for the Schur complement: "atoms" are the PSD blocks and the single
 *   orthant coordinates; constraints touching few atoms are joined by union–find into groups that
 *   share atoms, constraints touching many atoms are "global". Two constraints in different groups
 *   touch no common atom, so their Schur complement entry is structurally zero: the Schur
 *   complement is block diagonal plus a border of global rows (see schur.ts).
 *
 * Does not: scale or presolve the data, remove dependent constraints (the factorization does
 * that), or accept inequality constraints (add a nonnegative slack block).
 * Cost: O(total number of entries + constraints).
 */
import { RhoError } from '../errors.js';
import type { CMatrix } from '../linalg/index.js';
import type { BlockTerm, Cone, Entry, SdpProblem } from './types.js';

const isArr = (x: unknown): boolean => Array.isArray(x);

/** Constraints touching more atoms than this are treated as global (border rows of the Schur complement). */
export const GLOBAL_ATOM_THRESHOLD = 16;

export interface PsdBlock {
  /** Internal (real) size: the cone's size, doubled for Hermitian blocks. */
  n: number;
  cone: number;
  hermitian: boolean;
  /** Constraints touching this block, ascending. */
  cons: Int32Array;
  /** Per touching constraint: upper-triangle triplets. */
  tp: Int32Array[];
  tq: Int32Array[];
  tv: Float64Array[];
  /** Dense symmetric objective block. */
  c: Float64Array;
  /**
   * Hermitian blocks only: the same coefficients in the user's complex form, per touching
   * constraint: entries (p ≤ q, A_pq = re + i·im, standing also for A_qp = conj) of the size/2
   * complex matrix A with ⟨A, X⟩ = Re tr(A X). Used by the Schur assembly, which works in complex
   * arithmetic on Hermitian blocks (half the dimension of the embedding).
   */
  complex?: { p: Int32Array[]; q: Int32Array[]; re: Float64Array[]; im: Float64Array[] };
}

/** The complex entries of a Hermitian coefficient from its internal triplets (emb(A)/2, upper triangle). */
function complexEntries(p: Int32Array, q: Int32Array, v: Float64Array, n: number): { p: Int32Array; q: Int32Array; re: Float64Array; im: Float64Array } {
  const s = n / 2;
  const map = new Map<number, [number, number]>();
  for (let t = 0; t < v.length; t++) {
    const a = p[t];
    const b = q[t];
    if (b < s) {
      // top-left block: Re A_ab = 2v
      const e = map.get(a * s + b) ?? [0, 0];
      e[0] += 2 * v[t];
      map.set(a * s + b, e);
    } else if (a < s && a < b - s) {
      // top-right block above its diagonal: emb[a][j+s] = −Im A_aj / 2
      const j = b - s;
      const e = map.get(a * s + j) ?? [0, 0];
      e[1] += -2 * v[t];
      map.set(a * s + j, e);
    }
  }
  const keys = [...map.keys()].sort((x, y) => x - y);
  const out = { p: new Int32Array(keys.length), q: new Int32Array(keys.length), re: new Float64Array(keys.length), im: new Float64Array(keys.length) };
  keys.forEach((key, e) => {
    out.p[e] = Math.floor(key / s);
    out.q[e] = key % s;
    out.re[e] = map.get(key)![0];
    out.im[e] = map.get(key)![1];
  });
  return out;
}

export interface Compiled {
  m: number;
  b: Float64Array;
  psd: PsdBlock[];
  /** Orthant part: size, objective, rows (CSR by constraint) and columns (CSC by coordinate). */
  nL: number;
  cL: Float64Array;
  linRowPtr: Int32Array;
  linIdx: Int32Array;
  linVal: Float64Array;
  linColPtr: Int32Array;
  linColRow: Int32Array;
  linColVal: Float64Array;
  /** Free part: size, objective, rows by constraint. */
  nF: number;
  cF: Float64Array;
  freeRowPtr: Int32Array;
  freeIdx: Int32Array;
  freeVal: Float64Array;
  /** Where each user cone lives internally. */
  place: ({ type: 'psd'; index: number } | { type: 'lin'; offset: number } | { type: 'free'; offset: number })[];
  cones: readonly Cone[];
  /** Barrier degree: Σ internal PSD sizes + orthant size. */
  degree: number;
  /** Constraint grouping for the Schur complement. */
  groupOf: Int32Array;
  localIndex: Int32Array;
  groups: Int32Array[];
  globals: Int32Array;
}

type Triplets = Map<number, number>; // key p*n+q (p ≤ q) → value

function addTriplet(t: Triplets, n: number, p: number, q: number, v: number): void {
  if (v === 0) return;
  const a = Math.min(p, q);
  const b = Math.max(p, q);
  const key = a * n + b;
  t.set(key, (t.get(key) ?? 0) + v);
}

/** Add a Hermitian entry (i, j, re + i·im) (mirrored when i ≠ j) into internal triplets. */
function addEntry(t: Triplets, cone: Cone, n: number, i: number, j: number, re: number, im: number, termPath: string, index: number | null): void {
  const size = cone.size;
  const path = index === null ? termPath : `${termPath}.entries[${index}]`;
  if (!Number.isInteger(i) || !Number.isInteger(j) || i < 0 || j < 0 || i >= size || j >= size) {
    throw new RhoError('dimension-mismatch', `entry (${i}, ${j}) is outside the ${size}×${size} block`, path);
  }
  if (!Number.isFinite(re) || !Number.isFinite(im)) throw new RhoError('invalid-argument', 'coefficient entries must be finite numbers', path);
  if (cone.kind === 'symmetric') {
    if (im !== 0) throw new RhoError('invalid-argument', 'a real symmetric block takes real coefficients only', path);
    addTriplet(t, n, i, j, re);
    return;
  }
  // hermitian: internal = emb(A)/2
  if (i === j) {
    if (im !== 0) throw new RhoError('not-hermitian', `diagonal entry (${i}, ${i}) must be real`, path);
    addTriplet(t, n, i, i, re / 2);
    addTriplet(t, n, i + size, i + size, re / 2);
    return;
  }
  addTriplet(t, n, i, j, re / 2);
  addTriplet(t, n, i + size, j + size, re / 2);
  addTriplet(t, n, i, j + size, -im / 2);
  addTriplet(t, n, j, i + size, im / 2);
}

function readDense(term: { matrix: unknown }, size: number, path: string): { re: ArrayLike<number>; im: ArrayLike<number> | null } {
  const m = term.matrix as any;
  if (m && m.re instanceof Float64Array) {
    const c = m as CMatrix;
    if (c.rows !== size || c.cols !== size) throw new RhoError('dimension-mismatch', `matrix is ${c.rows}×${c.cols}, block is ${size}×${size}`, path);
    return { re: c.re, im: c.im };
  }
  const rowsRe = Array.isArray(m) ? m : m?.re;
  const rowsIm = Array.isArray(m) ? null : m?.im;
  if (!Array.isArray(rowsRe) || rowsRe.length !== size || (rowsIm && (!Array.isArray(rowsIm) || rowsIm.length !== size))) {
    throw new RhoError('dimension-mismatch', `matrix must have ${size} rows of ${size} numbers`, path);
  }
  const re = new Float64Array(size * size);
  const im = rowsIm ? new Float64Array(size * size) : null;
  for (let i = 0; i < size; i++) {
    const r = rowsRe[i];
    const ri = rowsIm ? rowsIm[i] : null;
    if (!Array.isArray(r) || r.length !== size || (rowsIm && (!Array.isArray(ri) || ri.length !== size))) {
      throw new RhoError('dimension-mismatch', `row ${i} must have ${size} numbers`, path);
    }
    for (let j = 0; j < size; j++) {
      re[i * size + j] = r[j];
      if (im && ri) im[i * size + j] = ri[j];
    }
  }
  return { re, im };
}

interface ParsedTerms {
  psd: Map<number, Triplets>; // by psd index
  lin: Map<number, number>; // orthant coordinate → value
  free: Map<number, number>;
}

function parseTerms(terms: readonly BlockTerm[], cones: readonly Cone[], place: Compiled['place'], psdSizes: number[], path: string): ParsedTerms {
  const out: ParsedTerms = { psd: new Map(), lin: new Map(), free: new Map() };
  if (!Array.isArray(terms)) throw new RhoError('invalid-argument', 'terms must be an array', path);
  terms.forEach((term, ti) => {
    const tp = path + '[' + ti + ']';
    const k = (term as any)?.block;
    if (!Number.isInteger(k) || k < 0 || k >= cones.length) throw new RhoError('invalid-argument', `block ${k} does not exist`, `${tp}.block`);
    const cone = cones[k];
    const pl = place[k];
    if (pl.type === 'psd') {
      const n = psdSizes[pl.index];
      let t = out.psd.get(pl.index);
      if (!t) out.psd.set(pl.index, (t = new Map()));
      if ('entries' in term) {
        (term.entries as readonly Entry[]).forEach((e: Entry, ei: number) => {
          if (!isArr(e) || e.length < 3) throw new RhoError('invalid-argument', 'a matrix entry is [row, col, re] or [row, col, re, im]', `${tp}.entries[${ei}]`);
          addEntry(t!, cone, n, e[0], e[1], e[2] as number, (e[3] as number | undefined) ?? 0, tp, ei);
        });
      } else if ('matrix' in term) {
        const { re, im } = readDense(term, cone.size, `${tp}.matrix`);
        const s = cone.size;
        let scale = 0;
        for (let q = 0; q < s * s; q++) scale = Math.max(scale, Math.abs(re[q]), im ? Math.abs(im[q]) : 0);
        const tol = 1e-10 * Math.max(scale, 1e-300);
        for (let i = 0; i < s; i++) {
          for (let j = i; j < s; j++) {
            const a = re[i * s + j];
            const b = re[j * s + i];
            const ai = im ? im[i * s + j] : 0;
            const bi = im ? im[j * s + i] : 0;
            if (!Number.isFinite(a) || !Number.isFinite(ai)) throw new RhoError('invalid-argument', 'coefficient entries must be finite numbers', `${tp}.matrix`);
            if (Math.abs(a - b) > tol || Math.abs(ai + bi) > tol) {
              throw new RhoError('not-hermitian', `coefficient matrix is not ${cone.kind === 'symmetric' ? 'symmetric' : 'Hermitian'} at (${i}, ${j})`, `${tp}.matrix`);
            }
            const vr = 0.5 * (a + b);
            const vi = i === j ? 0 : 0.5 * (ai - bi);
            if (vr !== 0 || vi !== 0) addEntry(t, cone, n, i, j, vr, vi, `${tp}.matrix`, null);
          }
        }
      } else {
        throw new RhoError('invalid-argument', `block ${k} is a matrix block: give "entries" or "matrix"`, tp);
      }
    } else {
      const target = pl.type === 'lin' ? out.lin : out.free;
      const add = (i: number, v: number, pth: () => string) => {
        if (!Number.isInteger(i) || i < 0 || i >= cone.size) throw new RhoError('dimension-mismatch', `index ${i} is outside the block of size ${cone.size}`, pth());
        if (!Number.isFinite(v)) throw new RhoError('invalid-argument', 'coefficients must be finite numbers', pth());
        if (v !== 0) target.set(pl.offset + i, (target.get(pl.offset + i) ?? 0) + v);
      };
      if ('vector' in term) {
        if (!isArr(term.vector) || term.vector.length !== cone.size) throw new RhoError('dimension-mismatch', `vector must have ${cone.size} entries`, `${tp}.vector`);
        (term.vector as readonly number[]).forEach((v: number, i: number) => add(i, v, () => `${tp}.vector[${i}]`));
      } else if ('entries' in term) {
        (term.entries as readonly Entry[]).forEach((e: Entry, ei: number) => {
          if (!isArr(e) || e.length !== 2) throw new RhoError('invalid-argument', 'a vector entry is [index, value]', `${tp}.entries[${ei}]`);
          add(e[0], e[1], () => `${tp}.entries[${ei}]`);
        });
      } else {
        throw new RhoError('invalid-argument', `block ${k} is a vector block: give "vector" or "entries"`, tp);
      }
    }
  });
  return out;
}

export function compile(problem: SdpProblem): Compiled {
  if (!problem || !Array.isArray(problem.cones)) throw new RhoError('invalid-argument', 'problem.cones must be an array', 'cones');
  if (!Array.isArray(problem.constraints)) throw new RhoError('invalid-argument', 'problem.constraints must be an array', 'constraints');
  const cones = problem.cones;
  const place: Compiled['place'] = [];
  const psdSizes: number[] = [];
  const psdCone: number[] = [];
  let nL = 0;
  let nF = 0;
  cones.forEach((c, k) => {
    if (!c || !Number.isInteger(c.size) || c.size < 1) throw new RhoError('invalid-argument', 'cone size must be a positive integer', `cones[${k}].size`);
    if (c.kind === 'symmetric' || c.kind === 'hermitian') {
      place.push({ type: 'psd', index: psdSizes.length });
      psdSizes.push(c.kind === 'hermitian' ? 2 * c.size : c.size);
      psdCone.push(k);
    } else if (c.kind === 'nonnegative') {
      place.push({ type: 'lin', offset: nL });
      nL += c.size;
    } else if (c.kind === 'free') {
      place.push({ type: 'free', offset: nF });
      nF += c.size;
    } else {
      throw new RhoError('invalid-argument', `unknown cone kind "${(c as any)?.kind}" (symmetric, hermitian, nonnegative, free)`, `cones[${k}].kind`);
    }
  });
  const m = problem.constraints.length;
  const b = new Float64Array(m);
  const obj = parseTerms(problem.objective ?? [], cones, place, psdSizes, 'objective');

  // Per PSD block: touching constraints and their triplets.
  const blockCons: number[][] = psdSizes.map(() => []);
  const blockTrip: Triplets[][] = psdSizes.map(() => []);
  const linRows: [number, number][][] = [];
  const freeRows: [number, number][][] = [];
  const atomsOf: number[][] = [];
  const nb = psdSizes.length;
  problem.constraints.forEach((con, i) => {
    const path = 'constraints[' + i + ']';
    if (!con || !Number.isFinite(con.equals)) throw new RhoError('invalid-argument', 'each constraint needs a finite "equals"', `${path}.equals`);
    b[i] = con.equals;
    const t = parseTerms(con.terms, cones, place, psdSizes, path + '.terms');
    const atoms: number[] = [];
    for (const [k, trip] of t.psd) {
      if (trip.size === 0) continue;
      blockCons[k].push(i);
      blockTrip[k].push(trip);
      atoms.push(k);
    }
    const lr = [...t.lin.entries()].sort((a, c) => a[0] - c[0]);
    for (const [p] of lr) atoms.push(nb + p);
    linRows.push(lr);
    freeRows.push([...t.free.entries()].sort((a, c) => a[0] - c[0]));
    atomsOf.push(atoms);
  });

  const psd: PsdBlock[] = psdSizes.map((n, k) => {
    const tp: Int32Array[] = [];
    const tq: Int32Array[] = [];
    const tv: Float64Array[] = [];
    for (const trip of blockTrip[k]) {
      const keys = [...trip.keys()].sort((a, c) => a - c);
      const p = new Int32Array(keys.length);
      const q = new Int32Array(keys.length);
      const v = new Float64Array(keys.length);
      keys.forEach((key, e) => {
        p[e] = Math.floor(key / n);
        q[e] = key % n;
        v[e] = trip.get(key)!;
      });
      tp.push(p);
      tq.push(q);
      tv.push(v);
    }
    const c = new Float64Array(n * n);
    const ct = obj.psd.get(k);
    if (ct) {
      for (const [key, v] of ct) {
        const p = Math.floor(key / n);
        const q = key % n;
        c[p * n + q] = v;
        c[q * n + p] = v;
      }
    }
    const hermitian = cones[psdCone[k]].kind === 'hermitian';
    let complex: PsdBlock['complex'];
    if (hermitian) {
      complex = { p: [], q: [], re: [], im: [] };
      for (let a = 0; a < tp.length; a++) {
        const e = complexEntries(tp[a], tq[a], tv[a], n);
        complex.p.push(e.p);
        complex.q.push(e.q);
        complex.re.push(e.re);
        complex.im.push(e.im);
      }
    }
    return { n, cone: psdCone[k], hermitian, cons: Int32Array.from(blockCons[k]), tp, tq, tv, c, complex };
  });

  // Orthant CSR and CSC.
  const linRowPtr = new Int32Array(m + 1);
  for (let i = 0; i < m; i++) linRowPtr[i + 1] = linRowPtr[i] + linRows[i].length;
  const linIdx = new Int32Array(linRowPtr[m]);
  const linVal = new Float64Array(linRowPtr[m]);
  const colCount = new Int32Array(nL + 1);
  for (let i = 0; i < m; i++) {
    linRows[i].forEach(([p, v], e) => {
      linIdx[linRowPtr[i] + e] = p;
      linVal[linRowPtr[i] + e] = v;
      colCount[p + 1]++;
    });
  }
  const linColPtr = new Int32Array(nL + 1);
  for (let p = 0; p < nL; p++) linColPtr[p + 1] = linColPtr[p] + colCount[p + 1];
  const fill = Int32Array.from(linColPtr.subarray(0, nL));
  const linColRow = new Int32Array(linRowPtr[m]);
  const linColVal = new Float64Array(linRowPtr[m]);
  for (let i = 0; i < m; i++) {
    for (let e = linRowPtr[i]; e < linRowPtr[i + 1]; e++) {
      const p = linIdx[e];
      linColRow[fill[p]] = i;
      linColVal[fill[p]] = linVal[e];
      fill[p]++;
    }
  }
  const freeRowPtr = new Int32Array(m + 1);
  for (let i = 0; i < m; i++) freeRowPtr[i + 1] = freeRowPtr[i] + freeRows[i].length;
  const freeIdx = new Int32Array(freeRowPtr[m]);
  const freeVal = new Float64Array(freeRowPtr[m]);
  for (let i = 0; i < m; i++) {
    freeRows[i].forEach(([p, v], e) => {
      freeIdx[freeRowPtr[i] + e] = p;
      freeVal[freeRowPtr[i] + e] = v;
    });
  }
  const cL = new Float64Array(nL);
  for (const [p, v] of obj.lin) cL[p] = v;
  const cF = new Float64Array(nF);
  for (const [p, v] of obj.free) cF[p] = v;

  // Grouping by union–find over atoms.
  const nAtoms = nb + nL;
  const parent = new Int32Array(nAtoms);
  for (let a = 0; a < nAtoms; a++) parent[a] = a;
  const find = (a: number): number => {
    while (parent[a] !== a) {
      parent[a] = parent[parent[a]];
      a = parent[a];
    }
    return a;
  };
  const isGlobal = atomsOf.map((atoms) => atoms.length === 0 || atoms.length > GLOBAL_ATOM_THRESHOLD);
  for (let i = 0; i < m; i++) {
    if (isGlobal[i]) continue;
    const atoms = atomsOf[i];
    const r0 = find(atoms[0]);
    for (let a = 1; a < atoms.length; a++) {
      const r = find(atoms[a]);
      if (r !== r0) parent[r] = r0;
    }
  }
  const groupOf = new Int32Array(m).fill(-1);
  const localIndex = new Int32Array(m);
  const rootGroup = new Map<number, number>();
  const groupLists: number[][] = [];
  const globalList: number[] = [];
  for (let i = 0; i < m; i++) {
    if (isGlobal[i]) {
      localIndex[i] = globalList.length;
      globalList.push(i);
      continue;
    }
    const r = find(atomsOf[i][0]);
    let g = rootGroup.get(r);
    if (g === undefined) {
      g = groupLists.length;
      rootGroup.set(r, g);
      groupLists.push([]);
    }
    groupOf[i] = g;
    localIndex[i] = groupLists[g].length;
    groupLists[g].push(i);
  }

  return {
    m,
    b,
    psd,
    nL,
    cL,
    linRowPtr,
    linIdx,
    linVal,
    linColPtr,
    linColRow,
    linColVal,
    nF,
    cF,
    freeRowPtr,
    freeIdx,
    freeVal,
    place,
    cones,
    degree: psdSizes.reduce((a, c) => a + c, 0) + nL,
    groupOf,
    localIndex,
    groups: groupLists.map((l) => Int32Array.from(l)),
    globals: Int32Array.from(globalList),
  };
}
