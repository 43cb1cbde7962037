import { readFileSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { MAX_STOPS, nearestNeighbourTour, planTour, seededRandom, tourLength, type DistanceFn } from '#shared/routing'
import { parseTsplib, tsplibDistance } from '#shared/routing/tsplib'

const fixture = (name: string) => parseTsplib(readFileSync(new URL(`./fixtures/${name}.tsp`, import.meta.url), 'utf8'))

function randomPlane(n: number, seed: number, side = 1000): { x: number; y: number }[] {
  const random = seededRandom(seed)
  return Array.from({ length: n }, () => ({ x: random() * side, y: random() * side }))
}

function euclid(points: readonly { x: number; y: number }[]): DistanceFn {
  return (i, j) => Math.hypot(points[i]!.x - points[j]!.x, points[i]!.y - points[j]!.y)
}

function expectTour(order: number[], n: number, start: number): void {
  expect(order).toHaveLength(n)
  expect(order[0]).toBe(start)
  expect([...order].sort((a, b) => a - b)).toEqual(Array.from({ length: n }, (_, i) => i))
}

/** Shortest closed tour by trying every order with stop 0 first: the independent reference for small n. */
function bruteForceLength(n: number, distance: DistanceFn): number {
  let best = Infinity
  const rest = Array.from({ length: n - 1 }, (_, i) => i + 1)
  const permute = (k: number): void => {
    if (k === rest.length) {
      best = Math.min(best, tourLength([0, ...rest], distance))
      return
    }
    for (let i = k; i < rest.length; i++) {
      ;[rest[k], rest[i]] = [rest[i]!, rest[k]!]
      permute(k + 1)
      ;[rest[k], rest[i]] = [rest[i]!, rest[k]!]
    }
  }
  permute(0)
  return best
}

describe('planTour on TSPLIB instances', () => {
  const instances = [
    { name: 'berlin52', optimum: 7542 }, // TSPLIB published optimum
    { name: 'eil51', optimum: 426 }, // TSPLIB published optimum
    { name: 'st70', optimum: 675 }, // TSPLIB published optimum
  ]

  for (const { name, optimum } of instances) {
    it(`${name}: within 3 % of the optimum ${optimum} and shorter than nearest neighbour`, () => {
      const instance = fixture(name)
      const distance = tsplibDistance(instance)
      const order = planTour(instance.dimension, distance)
      expectTour(order, instance.dimension, 0)
      const length = tourLength(order, distance)
      expect(length).toBeGreaterThanOrEqual(optimum)
      expect(length).toBeLessThanOrEqual(optimum * 1.03)
      expect(length).toBeLessThan(tourLength(nearestNeighbourTour(instance.dimension, distance, 0), distance))
    })
  }

  it('begins at the requested start and stays within 3 % from there', () => {
    const instance = fixture('berlin52')
    const distance = tsplibDistance(instance)
    for (const start of [17, 51]) {
      const order = planTour(instance.dimension, distance, { start })
      expectTour(order, 52, start)
      expect(tourLength(order, distance)).toBeLessThanOrEqual(7542 * 1.03) // TSPLIB published optimum
    }
  })

  it('gives the same tour for the same input and seed', () => {
    const instance = fixture('st70')
    const distance = tsplibDistance(instance)
    expect(planTour(70, distance, { start: 5 })).toEqual(planTour(70, distance, { start: 5 }))
    expect(planTour(70, distance, { seed: 9 })).toEqual(planTour(70, distance, { seed: 9 }))
  })
})

describe('planTour on random stops', () => {
  it('plans 130 stops and beats nearest neighbour (timing is in scripts/bench/routing.bench.ts)', () => {
    const points = randomPlane(130, 130)
    const distance = euclid(points)
    const order = planTour(130, distance, { start: 7 })
    expectTour(order, 130, 7)
    expect(tourLength(order, distance)).toBeLessThan(tourLength(nearestNeighbourTour(130, distance, 7), distance))
  })

  it('still returns an improved tour when the time budget is spent at once', () => {
    const points = randomPlane(200, 4)
    const distance = euclid(points)
    const order = planTour(200, distance, { timeBudgetMs: 0 })
    expectTour(order, 200, 0)
    expect(tourLength(order, distance)).toBeLessThan(tourLength(nearestNeighbourTour(200, distance, 0), distance))
  })

  it('finds the optimum of small instances (brute force over every order)', () => {
    for (let n = 4; n <= 9; n++) {
      for (const seed of [1, 2]) {
        const distance = euclid(randomPlane(n, 100 * n + seed))
        const order = planTour(n, distance, { start: n - 1 })
        expectTour(order, n, n - 1)
        expect(tourLength(order, distance)).toBeCloseTo(bruteForceLength(n, distance), 9)
      }
    }
  })
})

describe('planTour edge cases', () => {
  const line: DistanceFn = (i, j) => Math.abs(i - j)

  it('handles 0, 1, 2 and 3 stops', () => {
    expect(planTour(0, line)).toEqual([])
    expect(planTour(1, line)).toEqual([0])
    expect(planTour(2, line, { start: 1 })).toEqual([1, 0])
    expectTour(planTour(3, line, { start: 2 }), 3, 2)
  })

  it('visits stops at the same place one after the other, at no extra length', () => {
    // 30 distinct places, then 2 more copies of each of the first 10.
    const places = randomPlane(30, 77)
    const points = [...places, ...places.slice(0, 10), ...places.slice(0, 10)]
    const distance = euclid(points)
    const order = planTour(points.length, distance, { start: 35 })
    expectTour(order, 50, 35)
    expect(tourLength(order, distance)).toBeCloseTo(tourLength(planTour(30, euclid(places)), euclid(places)), 9)
    for (let p = 0; p < 10; p++) {
      const at = [p, p + 30, p + 40].map((s) => order.indexOf(s)).sort((a, b) => a - b)
      expect(at[2]! - at[0]!, `copies of place ${p}`).toBe(2)
    }
  })

  it('handles every stop at one place', () => {
    const order = planTour(20, () => 0, { start: 3 })
    expectTour(order, 20, 3)
  })

  it('refuses bad sizes, starts and distances', () => {
    expect(() => planTour(-1, line)).toThrow(RangeError)
    expect(() => planTour(2.5, line)).toThrow(RangeError)
    expect(() => planTour(MAX_STOPS + 1, line)).toThrow(RangeError)
    expect(() => planTour(5, line, { start: 5 })).toThrow(RangeError)
    expect(() => planTour(5, line, { timeBudgetMs: -1 })).toThrow(RangeError)
    expect(() => planTour(5, () => Number.NaN)).toThrow(/finite number/)
    expect(() => planTour(5, () => -1)).toThrow(RangeError)
    expect(() => nearestNeighbourTour(5, line, 9)).toThrow(RangeError)
  })
})

describe('nearestNeighbourTour and tourLength', () => {
  it('walks to the nearest unvisited stop each time', () => {
    // Stops on a line at 0, 1, 3, 7 and 15: from 3 the nearest are 1, then 0, then 7, then 15.
    const at = [0, 1, 3, 7, 15]
    const distance: DistanceFn = (i, j) => Math.abs(at[i]! - at[j]!)
    expect(nearestNeighbourTour(5, distance, 2)).toEqual([2, 1, 0, 3, 4])
    expect(tourLength([2, 1, 0, 3, 4], distance)).toBe(2 + 1 + 7 + 8 + 12)
    expect(tourLength([4], distance)).toBe(0)
    expect(tourLength([0, 4], distance)).toBe(30)
  })
})
