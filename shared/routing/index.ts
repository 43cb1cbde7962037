import { seededRandom } from './random'

export { EARTH_MEAN_RADIUS_KM, greatCircleKm, tripEstimate } from './geo'
export type { LatLon, TripEstimate, TripEstimateOptions } from './geo'
export { seededRandom } from './random'

/** Cost of going from stop i to stop j (km, minutes, …): symmetric, finite and ≥ 0; planTour reads it for i < j only. */
export type DistanceFn = (i: number, j: number) => number

export interface PlanTourOptions {
  /** Stop the tour begins and ends at (the crew's base); 0 when left out. */
  start?: number
  /**
   * Wall-clock cap in ms on the perturbation rounds. Without it the work is bounded by an iteration
   * count only, so the same input always gives the same tour.
   */
  timeBudgetMs?: number
  /** Seed of the perturbation sequence. */
  seed?: number
}

/** The whole matrix is held in memory (8·n² bytes), which bounds the size of a tour. */
export const MAX_STOPS = 3000

/** Candidate neighbours per stop: enough for Euclidean-like costs, few enough to keep moves cheap. */
const NEIGHBOURS = 10
/** Up to this many distinct places the optimum is found exactly (Held–Karp, 2^(n−1)·n² steps). */
const EXACT_LIMIT = 12
/** Or-opt moves chains of up to this many stops. */
const MAX_SEGMENT = 3
/** Perturbation rounds per stop, and their cap: the rounds are O(1) moves each but reversals cost O(n). */
const KICKS_PER_STOP = 25
const MAX_KICKS = 20_000
/** Segments of a double-bridge kick stay short so that the kick is local and cheap to repair. */
const KICK_SEGMENT = 30
const DEFAULT_SEED = 0x5eed_7001

/** Length of the closed tour `order` (back to order[0] at the end). */
export function tourLength(order: readonly number[], distance: DistanceFn): number {
  if (order.length < 2) return 0
  let total = 0
  for (let k = 0; k < order.length; k++) {
    total += distance(order[k]!, order[k + 1 === order.length ? 0 : k + 1]!)
  }
  return total
}

/** Nearest-neighbour tour from `start` (ties go to the lower index): the baseline the planner must beat. */
export function nearestNeighbourTour(n: number, distance: DistanceFn, start = 0): number[] {
  checkSize(n)
  if (n === 0) return []
  checkStart(n, start)
  const visited = new Uint8Array(n)
  const order = [start]
  visited[start] = 1
  let current = start
  for (let step = 1; step < n; step++) {
    let best = -1
    let bestD = Infinity
    for (let j = 0; j < n; j++) {
      if (visited[j]) continue
      const d = distance(current, j)
      if (d < bestD) {
        bestD = d
        best = j
      }
    }
    // Every distance was Infinity or NaN: still return a permutation.
    if (best === -1) best = visited.indexOf(0)
    visited[best] = 1
    order.push(best)
    current = best
  }
  return order
}

/**
 * Order of the n stops (0…n−1) for a short closed tour beginning at `start`: greedy-edge construction,
 * then 2-opt and Or-opt with neighbour lists and don't-look bits, then seeded double-bridge rounds
 * that keep only changes that do not lengthen the tour. Exact for up to 12 distinct places.
 * Stops at distance 0 from each other are visited one after the other.
 */
export function planTour(n: number, distance: DistanceFn, options: PlanTourOptions = {}): number[] {
  checkSize(n)
  if (n === 0) return []
  const start = options.start ?? 0
  checkStart(n, start)
  const { timeBudgetMs } = options
  if (timeBudgetMs !== undefined && !(timeBudgetMs >= 0)) throw new RangeError(`timeBudgetMs must be ≥ 0, got ${timeBudgetMs}`)
  const deadline = timeBudgetMs === undefined ? Infinity : performance.now() + timeBudgetMs
  if (n === 1) return [0]

  const full = readMatrix(n, distance)
  const { members, repOf } = groupDuplicates(n, full)
  const m = members.length
  const matrix = m === n ? full : reduceMatrix(n, full, members)
  const order = solve(m, matrix, options.seed ?? DEFAULT_SEED, deadline)

  // Rotate to the start's place, then expand each place into its stops, the start itself first.
  const startRep = repOf[start]!
  const shift = order.indexOf(startRep)
  const out: number[] = []
  for (let k = 0; k < m; k++) {
    const rep = order[(shift + k) % m]!
    const group = members[rep]!
    if (rep === startRep) {
      out.push(start)
      for (const s of group) if (s !== start) out.push(s)
    } else {
      out.push(...group)
    }
  }
  return out
}

function checkSize(n: number): void {
  if (!(Number.isInteger(n) && n >= 0)) throw new RangeError(`n must be a whole number ≥ 0, got ${n}`)
  if (n > MAX_STOPS) throw new RangeError(`A tour holds at most ${MAX_STOPS} stops, got ${n}`)
}

function checkStart(n: number, start: number): void {
  if (!(Number.isInteger(start) && start >= 0 && start < n)) throw new RangeError(`start must be a stop index 0…${n - 1}, got ${start}`)
}

function readMatrix(n: number, distance: DistanceFn): Float64Array {
  const d = new Float64Array(n * n)
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const v = distance(i, j)
      // NaN or negative costs would let the local search loop forever or return nonsense.
      if (!(Number.isFinite(v) && v >= 0)) throw new RangeError(`distance(${i}, ${j}) must be a finite number ≥ 0, got ${v}`)
      d[i * n + j] = v
      d[j * n + i] = v
    }
  }
  return d
}

/** Stops at distance 0 form one place; members are listed in index order. */
function groupDuplicates(n: number, d: Float64Array): { members: number[][]; repOf: Int32Array } {
  const repOf = new Int32Array(n).fill(-1)
  const members: number[][] = []
  for (let i = 0; i < n; i++) {
    if (repOf[i] !== -1) continue
    const place = members.length
    const group = [i]
    repOf[i] = place
    for (let j = i + 1; j < n; j++) {
      if (repOf[j] === -1 && d[i * n + j] === 0) {
        repOf[j] = place
        group.push(j)
      }
    }
    members.push(group)
  }
  return { members, repOf }
}

function reduceMatrix(n: number, full: Float64Array, members: number[][]): Float64Array {
  const m = members.length
  const d = new Float64Array(m * m)
  for (let a = 0; a < m; a++) {
    const i = members[a]![0]!
    for (let b = 0; b < m; b++) d[a * m + b] = full[i * n + members[b]![0]!]!
  }
  return d
}

function solve(m: number, d: Float64Array, seed: number, deadline: number): Int32Array {
  if (m <= 3) return Int32Array.from({ length: m }, (_, i) => i)
  if (m <= EXACT_LIMIT) return heldKarp(m, d)
  const k = Math.min(NEIGHBOURS, m - 1)
  const neighbours = neighbourLists(m, d, k)
  const search = new LocalSearch(m, d, neighbours, k, greedyEdgeTour(m, d, neighbours, k))
  search.optimiseAll()
  search.perturb(Math.min(MAX_KICKS, KICKS_PER_STOP * m), seededRandom(seed), deadline)
  return search.tour
}

/** Exact tour by dynamic programming over subsets (Held–Karp), from place 0. */
function heldKarp(m: number, d: Float64Array): Int32Array {
  const k = m - 1
  const full = 1 << k
  const cost = new Float64Array(full * k).fill(Infinity)
  const parent = new Int8Array(full * k).fill(-1)
  for (let j = 0; j < k; j++) cost[(1 << j) * k + j] = d[j + 1]!
  for (let mask = 1; mask < full; mask++) {
    for (let j = 0; j < k; j++) {
      if (!(mask & (1 << j))) continue
      const here = cost[mask * k + j]!
      if (here === Infinity) continue
      for (let t = 0; t < k; t++) {
        if (mask & (1 << t)) continue
        const next = (mask | (1 << t)) * k + t
        const v = here + d[(j + 1) * m + t + 1]!
        if (v < cost[next]!) {
          cost[next] = v
          parent[next] = j
        }
      }
    }
  }
  let last = 0
  let best = Infinity
  for (let j = 0; j < k; j++) {
    const v = cost[(full - 1) * k + j]! + d[(j + 1) * m]!
    if (v < best) {
      best = v
      last = j
    }
  }
  const order = new Int32Array(m)
  let mask = full - 1
  for (let slot = m - 1; slot >= 1; slot--) {
    order[slot] = last + 1
    const prev = parent[mask * k + last]!
    mask &= ~(1 << last)
    last = prev
  }
  return order
}

/** The k nearest other places of each place, nearest first (ties to the lower index). */
function neighbourLists(m: number, d: Float64Array, k: number): Int32Array {
  const out = new Int32Array(m * k)
  const bestD = new Float64Array(k)
  for (let i = 0; i < m; i++) {
    let size = 0
    const row = i * k
    for (let j = 0; j < m; j++) {
      if (j === i) continue
      const dij = d[i * m + j]!
      if (size === k && dij >= bestD[k - 1]!) continue
      let p = size < k ? size++ : k - 1
      while (p > 0 && bestD[p - 1]! > dij) {
        bestD[p] = bestD[p - 1]!
        out[row + p] = out[row + p - 1]!
        p--
      }
      bestD[p] = dij
      out[row + p] = j
    }
  }
  return out
}

/**
 * Greedy edge construction (shortest candidate edges first, no place of degree 3, no early cycle),
 * then the remaining path fragments joined end to nearest end.
 */
function greedyEdgeTour(m: number, d: Float64Array, neighbours: Int32Array, k: number): Int32Array {
  // An edge {i, j} with i < j is keyed i·m + j, which is also its index in the matrix.
  const keys = new Float64Array(m * k)
  for (let i = 0; i < m; i++) {
    for (let t = 0; t < k; t++) {
      const j = neighbours[i * k + t]!
      keys[i * k + t] = i < j ? i * m + j : j * m + i
    }
  }
  keys.sort()
  const unique: number[] = []
  for (let t = 0; t < keys.length; t++) if (t === 0 || keys[t] !== keys[t - 1]) unique.push(keys[t]!)
  unique.sort((a, b) => d[a]! - d[b]! || a - b)

  const degree = new Uint8Array(m)
  const link = new Int32Array(2 * m).fill(-1)
  const root = Int32Array.from({ length: m }, (_, i) => i)
  const find = (x: number): number => {
    while (root[x] !== x) {
      root[x] = root[root[x]!]!
      x = root[x]!
    }
    return x
  }
  for (const key of unique) {
    const i = Math.floor(key / m)
    const j = key - i * m
    if (degree[i]! >= 2 || degree[j]! >= 2) continue
    const ri = find(i)
    const rj = find(j)
    if (ri === rj) continue
    root[ri] = rj
    link[2 * i + degree[i]!] = j
    link[2 * j + degree[j]!] = i
    degree[i] = degree[i]! + 1
    degree[j] = degree[j]! + 1
  }

  const ends: number[] = []
  for (let i = 0; i < m; i++) if (degree[i]! < 2) ends.push(i)
  const used = new Uint8Array(m)
  const tour = new Int32Array(m)
  let size = 0
  let from = ends[0]!
  for (;;) {
    let prev = -1
    let node = from
    while (node !== -1) {
      tour[size++] = node
      used[node] = 1
      const a = link[2 * node]!
      const b = link[2 * node + 1]!
      const next = a !== -1 && a !== prev ? a : b !== -1 && b !== prev ? b : -1
      prev = node
      node = next
    }
    let best = -1
    let bestD = Infinity
    for (const e of ends) {
      if (used[e]) continue
      const v = d[prev * m + e]!
      if (v < bestD) {
        bestD = v
        best = e
      }
    }
    if (best === -1) break
    from = best
  }
  return tour
}

/**
 * A tour as an array with positions; every change is a chain of path reversals, logged so that a
 * rejected perturbation round can be undone in the time it took.
 */
class LocalSearch {
  readonly tour: Int32Array
  private readonly pos: Int32Array
  private readonly queue: Int32Array
  private readonly queued: Uint8Array
  private head = 0
  private queueSize = 0
  private readonly eps: number
  private readonly log: number[] = []
  private logging = false
  /** Sum of the gains of the moves made since it was last reset. */
  private gained = 0

  constructor(
    private readonly n: number,
    private readonly d: Float64Array,
    private readonly neighbours: Int32Array,
    private readonly k: number,
    order: Int32Array,
  ) {
    this.tour = order
    this.pos = new Int32Array(n)
    for (let i = 0; i < n; i++) this.pos[order[i]!] = i
    this.queue = new Int32Array(n)
    this.queued = new Uint8Array(n)
    let length = 0
    for (let i = 0; i < n; i++) length += d[order[i]! * n + order[(i + 1) % n]!]!
    // Gains below this are rounding noise; counting them could cycle between equal tours.
    this.eps = (1e-9 * length) / n
  }

  optimiseAll(): void {
    for (let i = 0; i < this.n; i++) this.push(this.tour[i]!)
    this.run()
  }

  /** Double-bridge kicks, each repaired by local search and undone unless the tour got no longer. */
  perturb(rounds: number, random: () => number, deadline: number): void {
    const { n } = this
    const span = Math.max(1, Math.min(KICK_SEGMENT, Math.floor(n / 3)))
    this.logging = true
    for (let round = 0; round < rounds; round++) {
      if (deadline !== Infinity && performance.now() >= deadline) break
      this.log.length = 0
      this.gained = 0
      const base = Math.floor(random() * n)
      const l1 = 1 + Math.floor(random() * span)
      const l2 = 1 + Math.floor(random() * span)
      const change = this.doubleBridge(base, l1, l2) - this.run()
      if (change > this.eps) this.undo()
    }
    this.logging = false
    this.log.length = 0
  }

  private next(c: number): number {
    const p = this.pos[c]! + 1
    return this.tour[p === this.n ? 0 : p]!
  }

  private prev(c: number): number {
    const p = this.pos[c]!
    return this.tour[p === 0 ? this.n - 1 : p - 1]!
  }

  private dist(i: number, j: number): number {
    return this.d[i * this.n + j]!
  }

  private push(c: number): void {
    if (this.queued[c]) return
    this.queued[c] = 1
    let slot = this.head + this.queueSize
    if (slot >= this.n) slot -= this.n
    this.queue[slot] = c
    this.queueSize++
  }

  /** Improves until no queued place has an improving move; returns the total gain. */
  private run(): number {
    const before = this.gained
    while (this.queueSize > 0) {
      const a = this.queue[this.head]!
      this.head = this.head + 1 === this.n ? 0 : this.head + 1
      this.queueSize--
      this.queued[a] = 0
      if (!this.twoOpt(a)) this.orOpt(a)
    }
    return this.gained - before
  }

  /**
   * Reverses the path from `from` forward to `to`, or the rest of the tour when that is shorter:
   * for a symmetric cost both give the same cycle, read in opposite directions.
   */
  private reversePath(from: number, to: number): void {
    const { n } = this
    const i0 = this.pos[from]!
    const j0 = this.pos[to]!
    let len = j0 - i0
    if (len < 0) len += n
    len += 1
    let i = i0
    if (2 * len > n) {
      i = j0 + 1 === n ? 0 : j0 + 1
      len = n - len
    }
    if (this.logging) this.log.push(i, len)
    this.reversePositions(i, len)
  }

  private reversePositions(i: number, len: number): void {
    const { n, tour, pos } = this
    let j = i + len - 1
    if (j >= n) j -= n
    for (let s = len >> 1; s > 0; s--) {
      const a = tour[i]!
      const b = tour[j]!
      tour[i] = b
      pos[b] = i
      tour[j] = a
      pos[a] = j
      i = i + 1 === n ? 0 : i + 1
      j = j === 0 ? n - 1 : j - 1
    }
  }

  private undo(): void {
    // A reversal of a fixed range of positions is its own inverse.
    for (let t = this.log.length - 2; t >= 0; t -= 2) this.reversePositions(this.log[t]!, this.log[t + 1]!)
    this.log.length = 0
  }

  /** First improving 2-opt move that removes an edge at `a`, searched from a's nearest places. */
  private twoOpt(a: number): boolean {
    const { neighbours, k, eps } = this
    for (let dir = 0; dir < 2; dir++) {
      const b = dir === 0 ? this.next(a) : this.prev(a)
      const dab = this.dist(a, b)
      for (let t = 0; t < k; t++) {
        const c = neighbours[a * k + t]!
        const g1 = dab - this.dist(a, c)
        if (g1 <= eps) break
        const e = dir === 0 ? this.next(c) : this.prev(c)
        if (c === b || e === a) continue
        const gain = g1 + this.dist(c, e) - this.dist(b, e)
        if (gain > eps) {
          // Removes {a,b} and {c,e}, adds {a,c} and {b,e}.
          if (dir === 0) this.reversePath(b, c)
          else this.reversePath(a, e)
          this.gained += gain
          this.push(a)
          this.push(b)
          this.push(c)
          this.push(e)
          return true
        }
      }
    }
    return false
  }

  /**
   * First improving Or-opt move of a chain of 1…3 places that begins or ends at `a`, reinserted
   * either way round next to one of the nearest places of its ends.
   */
  private orOpt(a: number): boolean {
    const { n, neighbours, k, eps, pos } = this
    for (let len = 1; len <= MAX_SEGMENT && len + 3 <= n; len++) {
      for (let side = 0; side < (len === 1 ? 1 : 2); side++) {
        let s1 = a
        let s2 = a
        for (let step = 1; step < len; step++) {
          if (side === 0) s2 = this.next(s2)
          else s1 = this.prev(s1)
        }
        const p = this.prev(s1)
        const nx = this.next(s2)
        const removeGain = this.dist(p, s1) + this.dist(s2, nx) - this.dist(p, nx)
        if (removeGain <= eps) continue
        const first = pos[s1]!
        for (let end = 0; end < 2; end++) {
          const s = end === 0 ? s1 : s2
          const o = end === 0 ? s2 : s1
          for (let t = 0; t < k; t++) {
            const c = neighbours[s * k + t]!
            const dsc = this.dist(s, c)
            if (removeGain - dsc <= eps) break
            let offset = pos[c]! - first
            if (offset < 0) offset += n
            if (offset < len) continue
            for (let way = 0; way < 2; way++) {
              const e = way === 0 ? this.next(c) : this.prev(c)
              offset = pos[e]! - first
              if (offset < 0) offset += n
              if (offset < len) continue
              const gain = removeGain - dsc - this.dist(o, e) + this.dist(c, e)
              if (gain > eps) {
                const x = way === 0 ? c : e
                const y = way === 0 ? e : c
                this.moveSegment(s1, s2, len, p, nx, x, y, (c === x) !== (s === s1))
                this.gained += gain
                this.push(p)
                this.push(nx)
                this.push(s1)
                this.push(s2)
                this.push(c)
                this.push(e)
                return true
              }
            }
          }
        }
      }
    }
    return false
  }

  /**
   * Moves the chain S = s1…s2 (between p and nx) into the edge x→y. The cycle reads S B C with
   * B = nx…x and C = y…p; the result is B S C, or B Sʳ C when `reversed`. Three reversals at most,
   * through the shorter of B and C.
   */
  private moveSegment(s1: number, s2: number, len: number, p: number, nx: number, x: number, y: number, reversed: boolean): void {
    const { n } = this
    let lenB = this.pos[x]! - this.pos[nx]!
    if (lenB < 0) lenB += n
    lenB += 1
    if (lenB <= n - len - lenB) {
      this.reversePath(s1, x) // Bʳ Sʳ C
      if (this.next(p) === x) this.reversePath(x, nx)
      else this.reversePath(nx, x) // B Sʳ C
    } else {
      this.reversePath(y, s2) // B Sʳ Cʳ
      if (this.next(s1) === p) this.reversePath(p, y)
      else this.reversePath(y, p) // B Sʳ C
    }
    if (!reversed && len > 1) {
      if (this.next(x) === s2) this.reversePath(s2, s1)
      else this.reversePath(s1, s2)
    }
  }

  /**
   * Double bridge A B C D → A C B D with B and C the l1 and l2 places after tour[base]; returns the
   * change in length and queues the six places whose edges changed.
   */
  private doubleBridge(base: number, l1: number, l2: number): number {
    const { n, tour } = this
    const a = tour[base]!
    const b1 = tour[(base + 1) % n]!
    const b2 = tour[(base + l1) % n]!
    const c1 = tour[(base + l1 + 1) % n]!
    const c2 = tour[(base + l1 + l2) % n]!
    const d1 = tour[(base + l1 + l2 + 1) % n]!
    const change =
      this.dist(a, c1) + this.dist(c2, b1) + this.dist(b2, d1) - this.dist(a, b1) - this.dist(b2, c1) - this.dist(c2, d1)
    this.reversePath(b1, c2) // A Cʳ Bʳ D
    if (this.next(a) === c2) this.reversePath(c2, c1)
    else this.reversePath(c1, c2) // A C Bʳ D
    if (l1 > 1) {
      if (this.next(c2) === b2) this.reversePath(b2, b1)
      else this.reversePath(b1, b2) // A C B D
    }
    this.push(a)
    this.push(b1)
    this.push(b2)
    this.push(c1)
    this.push(c2)
    this.push(d1)
    return change
  }
}
