// Prime implicants (src/optimize/sop/primes.ts). The tabular method keeps its implicants in flat
// arrays indexed by a base-3 code of the cube up to 13 variables and in maps beyond; both must
// give the same primes in the same order (the cover search breaks ties by that order, so the
// order is part of the result). Checked against:
//   - a reference written here by brute force from the definition (an implicant of ON ∪ DC is
//     prime when freeing any one of its literals leaves ON ∪ DC; Quine 1952, McCluskey 1956;
//     common practice): every one of the 3^n cubes is tried;
//   - the map-based method on the same functions, several outputs at once, with and without a
//     budget.
import { describe, expect, it } from "vitest";
import { seededRandom } from "../../src/logic/index.js";
import { mappedPrimes, multiOutputPrimes, primeImplicants } from "../../src/optimize/sop/primes.js";
import { cubeText, DC, OFF, ON, type Spec } from "../../src/optimize/sop/cube.js";

function randomSpec(n: number, rand: () => number, onShare: number, dcShare: number): Spec {
  return Uint8Array.from({ length: 2 ** n }, () => {
    const r = (rand() % 1000) / 1000;
    return r < dcShare ? DC : r < dcShare + onShare * (1 - dcShare) ? ON : OFF;
  });
}

/** Primes by brute force over all 3^n cubes, as text ('0', '1', '-' per variable). */
function referencePrimes(spec: Spec, n: number): string[] {
  let cubes = [""];
  for (let i = 0; i < n; i++) cubes = cubes.flatMap((s) => [s + "0", s + "1", s + "-"]);
  const holds = (c: string) => {
    for (let p = 0; p < 2 ** n; p++) {
      let inside = true;
      for (let i = 0; i < n && inside; i++) if (c[i] !== "-" && Number(c[i]) !== ((p >> i) & 1)) inside = false;
      if (inside && spec[p] === OFF) return false;
    }
    return true;
  };
  const implicants = new Set(cubes.filter(holds));
  return [...implicants].filter((c) => ![...c].some((ch, i) => ch !== "-" && implicants.has(c.slice(0, i) + "-" + c.slice(i + 1)))).sort();
}

describe("prime implicants", () => {
  it("equal the brute-force primes of ON ∪ DC (one output, up to 7 variables)", () => {
    const rand = seededRandom(20261202);
    for (let k = 0; k < 150; k++) {
      const n = 1 + (rand() % 7);
      const spec = randomSpec(n, rand, (rand() % 100) / 100, (rand() % 30) / 100);
      const got = primeImplicants(spec, n)!.map((c) => cubeText(c, n)).sort();
      const allOff = spec.every((v) => v === OFF);
      expect(got).toEqual(allOff ? [] : referencePrimes(spec, n));
    }
  });

  it("are the same, in the same order, from the flat arrays and from the maps (several outputs)", () => {
    const rand = seededRandom(7);
    for (let k = 0; k < 300; k++) {
      const n = 1 + (rand() % 11);
      const outs = 1 + (rand() % 4);
      const onShare = (rand() % 100) / 100;
      const dcShare = (rand() % 30) / 100;
      const specs = Array.from({ length: outs }, () => randomSpec(n, rand, onShare, dcShare));
      const budget = rand() % 5 === 0 ? rand() % 300 : 200_000;
      const dense = multiOutputPrimes(specs, n, budget);
      const mapped = mappedPrimes(specs, n, budget);
      expect(dense === undefined).toBe(mapped === undefined);
      expect(dense).toEqual(mapped);
    }
  });

  it("give the same answer when asked again after a call stopped at its budget", () => {
    const rand = seededRandom(11);
    const spec = randomSpec(9, rand, 0.6, 0.1);
    const first = primeImplicants(spec, 9);
    expect(primeImplicants(spec, 9, 50)).toBeUndefined();
    expect(primeImplicants(spec, 9)).toEqual(first);
    expect(first).toEqual(mappedPrimes([spec], 9, 200_000)!.map((t) => t.cube));
  });
});
