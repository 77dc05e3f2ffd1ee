// Tests for the element table (server/src/chem/elements-data.ts via elements.ts): spot checks
// against the IUPAC 2021 table, structure checks, symbol suggestions, and an optional
// cross-check of every row against Debian's python3-periodictable, an independent data
// library. The always-run cross-checks of every row are in elements-reference.test.ts.
import { execFileSync } from 'node:child_process';
import { describe, it, expect } from 'vitest';
import {
  ELEMENTS,
  elementBySymbol,
  isElementSymbol,
  suggestSymbols,
  type ElementInfo,
  type WeightKind,
} from '../../server/src/chem/elements';

function el(symbol: string): ElementInfo {
  const e = elementBySymbol(symbol);
  if (!e) throw new Error(`element ${symbol} missing from the table`);
  return e;
}

describe('element table: spot checks against IUPAC 2021', () => {
  const cases: Array<[string, number, WeightKind]> = [
    ['H', 1.008, 'conventional'], // IUPAC 2021 (CIAAW), interval [1.00784, 1.00811], conventional value
    ['C', 12.011, 'conventional'], // IUPAC 2021 (CIAAW), interval [12.0096, 12.0116], conventional value
    ['N', 14.007, 'conventional'], // IUPAC 2021 (CIAAW), interval [14.00643, 14.00728], conventional value
    ['O', 15.999, 'conventional'], // IUPAC 2021 (CIAAW), interval [15.99903, 15.99977], conventional value
    ['S', 32.06, 'conventional'], // IUPAC 2021 (CIAAW), interval [32.059, 32.076], conventional value
    ['Cl', 35.45, 'conventional'], // IUPAC 2021 (CIAAW), interval [35.446, 35.457], conventional value
    ['Br', 79.904, 'conventional'], // IUPAC 2021 (CIAAW), interval [79.901, 79.907], conventional value
    ['Pb', 207.2, 'conventional'], // IUPAC 2021 (CIAAW), interval [206.14, 207.94], conventional value
    ['Na', 22.98976928, 'standard'], // IUPAC 2021 (CIAAW), 22.989 769 28(2)
    ['K', 39.0983, 'standard'], // IUPAC 2021 (CIAAW), 39.0983(1)
    ['Fe', 55.845, 'standard'], // IUPAC 2021 (CIAAW), 55.845(2)
    ['Cu', 63.546, 'standard'], // IUPAC 2021 (CIAAW), 63.546(3)
    ['Zn', 65.38, 'standard'], // IUPAC 2021 (CIAAW), 65.38(2)
    ['Hf', 178.486, 'standard'], // IUPAC 2021 (CIAAW), 178.486(6)
    ['U', 238.02891, 'standard'], // IUPAC 2021 (CIAAW), 238.028 91(3)
    ['Tc', 97, 'mass-number'], // IUPAC 2021 (CIAAW) gives none; [97] as commonly tabulated in brackets
    ['Pu', 244, 'mass-number'], // IUPAC 2021 (CIAAW) gives none; [244] as commonly tabulated in brackets
    ['D', 2.014101778, 'isotope'], // AME2020 atomic mass of 2H, 2.014 101 778 12(12) u, rounded
    ['T', 3.01604928, 'isotope'], // AME2020 atomic mass of 3H, 3.016 049 281 32(8) u, rounded
  ];
  for (const [symbol, weight, kind] of cases) {
    it(`${symbol} = ${weight} (${kind})`, () => {
      expect(el(symbol).atomicWeight).toBe(weight);
      expect(el(symbol).weightKind).toBe(kind);
    });
  }

  it('uses the IUPAC spellings aluminium, caesium and sulfur', () => {
    expect(el('Al').name).toBe('aluminium'); // IUPAC 2021 (CIAAW) element name
    expect(el('Cs').name).toBe('caesium'); // IUPAC 2021 (CIAAW) element name
    expect(el('S').name).toBe('sulfur'); // IUPAC 2021 (CIAAW) element name
  });

  it('marks exactly the 14 interval elements of the 2021 table as conventional', () => {
    // IUPAC 2021 (CIAAW): these 14 standard atomic weights are given as intervals
    const intervalElements = ['H', 'Li', 'B', 'C', 'N', 'O', 'Mg', 'Si', 'S', 'Cl', 'Ar', 'Br', 'Tl', 'Pb'];
    const conventional = ELEMENTS.filter((e) => e.weightKind === 'conventional').map((e) => e.symbol);
    expect([...conventional].sort()).toEqual([...intervalElements].sort());
  });

  it('has a standard atomic weight for 84 elements and mass numbers for the other 34', () => {
    const count = (k: WeightKind): number => ELEMENTS.filter((e) => e.weightKind === k).length;
    expect(count('standard') + count('conventional')).toBe(84); // IUPAC 2021 (CIAAW): 84 elements have one
    expect(count('mass-number')).toBe(34); // 118 - 84, IUPAC 2021 (CIAAW)
    expect(count('isotope')).toBe(2); // D and T
    // IUPAC 2021 (CIAAW): Th, Pa and U have standard atomic weights despite having no stable isotope
    for (const s of ['Th', 'Pa', 'U']) expect(el(s).weightKind).toBe('standard');
    for (const e of ELEMENTS.filter((x) => x.weightKind === 'mass-number')) {
      expect(Number.isInteger(e.atomicWeight), e.symbol).toBe(true);
    }
  });
});

describe('element table: structure', () => {
  it('has 118 elements plus D and T', () => {
    expect(ELEMENTS.length).toBe(120); // 118 elements (IUPAC) + D + T
  });

  it('has each Z from 1 to 118 exactly once among the elements', () => {
    const zs = ELEMENTS.filter((e) => e.weightKind !== 'isotope').map((e) => e.z);
    expect([...zs].sort((a, b) => a - b)).toEqual(Array.from({ length: 118 }, (_, i) => i + 1));
  });

  it('lists the elements in order of Z, then D and T with z 1', () => {
    ELEMENTS.slice(0, 118).forEach((e, i) => expect(e.z).toBe(i + 1));
    expect(ELEMENTS.slice(118).map((e) => [e.symbol, e.z])).toEqual([
      ['D', 1],
      ['T', 1],
    ]);
  });

  it('has unique, well-formed symbols and names', () => {
    const symbols = ELEMENTS.map((e) => e.symbol);
    expect(new Set(symbols).size).toBe(symbols.length);
    expect(new Set(ELEMENTS.map((e) => e.name)).size).toBe(ELEMENTS.length);
    for (const e of ELEMENTS) {
      expect(e.symbol).toMatch(/^[A-Z][a-z]{0,1}$/);
      expect(e.name).toMatch(/^[a-z]+$/);
      expect(e.atomicWeight).toBeGreaterThan(0);
    }
  });

  it('weights increase with Z except at the known inversions', () => {
    // A coarse guard against gross typos. IUPAC 2021 (CIAAW): Ar > K, Co > Ni, Te > I and
    // Th > Pa are the standard-weight inversions; the bracketed mass numbers of this table add
    // U > Np [237], Pu [244] > Am [243] and Bh [270] > Hs [269]. Only these may decrease.
    const inversions = new Set(['K', 'Ni', 'I', 'Pa', 'Np', 'Am', 'Hs']);
    const els = ELEMENTS.slice(0, 118);
    for (let i = 1; i < els.length; i++) {
      if (inversions.has(els[i].symbol)) {
        expect(els[i].atomicWeight, els[i].symbol).toBeLessThan(els[i - 1].atomicWeight);
      } else {
        expect(els[i].atomicWeight, els[i].symbol).toBeGreaterThanOrEqual(els[i - 1].atomicWeight);
      }
    }
  });
});

describe('element lookup and suggestions', () => {
  it('looks symbols up case-sensitively', () => {
    expect(elementBySymbol('Cl')?.z).toBe(17); // IUPAC: chlorine is Z 17
    expect(elementBySymbol('CL')).toBeUndefined();
    expect(isElementSymbol('Co')).toBe(true);
    expect(isElementSymbol('CO')).toBe(false);
    expect(isElementSymbol('D')).toBe(true);
    expect(isElementSymbol('T')).toBe(true);
    expect(isElementSymbol('Xx')).toBe(false);
  });

  it('offers the case fix first (CL -> Cl)', () => {
    expect(suggestSymbols('CL')[0]).toBe('Cl');
    expect(suggestSymbols('cl')[0]).toBe('Cl');
    expect(suggestSymbols('NA')[0]).toBe('Na');
  });

  it('offers near symbols for an unknown one', () => {
    expect(suggestSymbols('Xx')).toEqual(['Xe']);
    // 'co' is Co by case, then the one-edit neighbours C and O, in table order
    expect(suggestSymbols('co')).toEqual(['Co', 'C', 'O']);
    expect(suggestSymbols('Qq')).toEqual([]);
  });

  it('respects the limit and never suggests unknown symbols', () => {
    expect(suggestSymbols('Cx', 2).length).toBeLessThanOrEqual(2);
    expect(suggestSymbols('Cx', 1).length).toBe(1);
    for (const s of suggestSymbols('Cx', 10)) expect(isElementSymbol(s)).toBe(true);
  });
});

// ---------------------------------------------------------------------------------------
// Optional cross-check against python3-periodictable (Debian package; the Python module
// `periodictable`). Its element masses come from an older IUPAC edition (NIST compilation of
// the 1999/2001 tables, module version 1.6.0 in Debian 12), so the differences from IUPAC
// 2021 are listed below, each with the exact expected difference and the reason.
//
// It is an extra: `npm test` needs only npm install, and the always-run cross-checks are in
// elements-reference.test.ts. Where the module cannot be imported, these tests are skipped
// and a warning names the missing reference and how to install it; with
// STILLPOINT_REQUIRE_PERIODICTABLE=1 (as .ci/run sets) they run and fail instead.
// STILLPOINT_PERIODICTABLE_PYTHON names the interpreter to use (default: the Debian
// /usr/bin/python3, then python3 on PATH).
// ---------------------------------------------------------------------------------------

interface PtRow {
  z: number;
  symbol: string;
  name: string;
  mass: number;
}
interface PtDump {
  version: string;
  python: string;
  rows: PtRow[];
}

const INSTALL_HINT =
  'Install it with `sudo apt-get install python3-periodictable` (into the Debian /usr/bin/python3), ' +
  'or `pip install periodictable` and set STILLPOINT_PERIODICTABLE_PYTHON to that interpreter.';

const DUMP_SCRIPT = `
import json, sys
import periodictable as p
rows = []
for z in range(1, 119):
    e = p.elements[z]
    rows.append({"z": z, "symbol": e.symbol, "name": e.name, "mass": float(e.mass)})
for iso in (p.D, p.T):
    rows.append({"z": 1, "symbol": iso.symbol, "name": iso.name, "mass": float(iso.mass)})
print(json.dumps({"version": p.__version__, "python": sys.executable, "rows": rows}))
`;

/** Whether a missing periodictable fails the run (1) or skips these tests with a warning (unset, empty or 0). */
function periodictableRequired(): boolean {
  const value = process.env.STILLPOINT_REQUIRE_PERIODICTABLE ?? '';
  if (value === '1') return true;
  if (value === '' || value === '0') return false;
  throw new Error(`STILLPOINT_REQUIRE_PERIODICTABLE must be 1, 0 or unset, not '${value}'`);
}

type PtProbe = { ok: true; dump: PtDump } | { ok: false; reason: string };

/** Runs the dump script; the Debian interpreter first (a PATH python3 may be another install without the package). */
function probePeriodictable(): PtProbe {
  const chosen = process.env.STILLPOINT_PERIODICTABLE_PYTHON;
  const pythons = chosen ? [chosen] : ['/usr/bin/python3', 'python3'];
  const failures: string[] = [];
  for (const python of pythons) {
    try {
      const out = execFileSync(python, ['-c', DUMP_SCRIPT], {
        encoding: 'utf8',
        timeout: 60_000,
        stdio: ['ignore', 'pipe', 'pipe'],
      });
      return { ok: true, dump: JSON.parse(out) as PtDump };
    } catch (err) {
      const e = err as { message?: string; stderr?: string };
      const detail = (e.stderr ?? '').trim().split('\n').pop() ?? '';
      failures.push(`${python}: ${detail || e.message || String(err)}`);
    }
  }
  return { ok: false, reason: `tried ${failures.join('; ')}` };
}

const PT_REQUIRED = periodictableRequired();
const PT_PROBE = probePeriodictable();
const PT_SKIPPED = !PT_PROBE.ok && !PT_REQUIRED;
if (!PT_PROBE.ok) {
  const what = PT_REQUIRED
    ? 'is required (STILLPOINT_REQUIRE_PERIODICTABLE=1) but absent, so its cross-check tests fail'
    : 'is absent, so its cross-check tests are SKIPPED (set STILLPOINT_REQUIRE_PERIODICTABLE=1 to fail instead)';
  console.warn(`[elements.test] optional reference python3-periodictable ${what}. ${INSTALL_HINT} (${PT_PROBE.reason})`);
}

function periodictableDump(): PtDump {
  if (PT_PROBE.ok) return PT_PROBE.dump;
  throw new Error(`python3-periodictable is absent. ${INSTALL_HINT}\n${PT_PROBE.reason}`);
}

function ptRow(symbol: string): PtRow {
  const row = periodictableDump().rows.find((r) => r.symbol === symbol);
  if (!row) throw new Error(`periodictable has no row for ${symbol}`);
  return row;
}

/** Relative tolerance for every weight not listed in ALLOWED_WEIGHT_DIFFERENCES. */
const TIGHT_RELATIVE_TOLERANCE = 1e-6;

/** Names that the two tables spell differently. */
const NAME_SPELLINGS: Record<string, { ours: string; periodictable: string; reason: string }> = {
  Al: { ours: 'aluminium', periodictable: 'aluminum', reason: 'IUPAC spelling vs US spelling' },
  Cs: { ours: 'caesium', periodictable: 'cesium', reason: 'IUPAC spelling vs US spelling' },
};

/**
 * Elements whose weight differs from periodictable 1.6.0 by more than the tight tolerance.
 * `diff` is ours minus periodictable's, exactly: a typo on either side fails the test.
 * The 2021 values are from IUPAC 2021 (CIAAW); the older values are periodictable's own
 * (IUPAC 1999/2001 via NIST), read from the installed package; CIAAW revision notes are
 * from memory except where a report is named.
 */
const ALLOWED_WEIGHT_DIFFERENCES: Record<string, { diff: number; reason: string }> = {
  // Interval elements: IUPAC 2021 conventional value vs the older single standard value.
  H: { diff: 1.008 - 1.00794, reason: 'IUPAC 2021 conventional 1.008 (interval [1.00784, 1.00811]) vs older 1.00794' },
  Li: { diff: 6.94 - 6.941, reason: 'IUPAC 2021 conventional 6.94 (interval [6.938, 6.997]) vs older 6.941' },
  B: { diff: 10.81 - 10.811, reason: 'IUPAC 2021 conventional 10.81 (interval [10.806, 10.821]) vs older 10.811' },
  C: { diff: 12.011 - 12.0107, reason: 'IUPAC 2021 conventional 12.011 (interval [12.0096, 12.0116]) vs older 12.0107' },
  N: { diff: 14.007 - 14.0067, reason: 'IUPAC 2021 conventional 14.007 (interval [14.00643, 14.00728]) vs older 14.0067' },
  O: { diff: 15.999 - 15.9994, reason: 'IUPAC 2021 conventional 15.999 (interval [15.99903, 15.99977]) vs older 15.9994' },
  Si: { diff: 28.085 - 28.0855, reason: 'IUPAC 2021 conventional 28.085 (interval [28.084, 28.086]) vs older 28.0855' },
  S: { diff: 32.06 - 32.065, reason: 'IUPAC 2021 conventional 32.06 (interval [32.059, 32.076]) vs older 32.065' },
  Cl: { diff: 35.45 - 35.453, reason: 'IUPAC 2021 conventional 35.45 (interval [35.446, 35.457]) vs older 35.453' },
  Ar: { diff: 39.95 - 39.948, reason: 'IUPAC 2021 conventional 39.95 (interval [39.792, 39.963]) vs older 39.948' },
  Tl: { diff: 204.38 - 204.3833, reason: 'IUPAC 2021 conventional 204.38 (interval [204.382, 204.385]) vs older 204.3833' },
  // Single-value standard atomic weights revised by CIAAW since the 2001 table.
  Zn: { diff: 65.38 - 65.409, reason: 'IUPAC 2021 65.38(2) vs older 65.409(4); revised by CIAAW after 2001' },
  Ge: { diff: 72.63 - 72.64, reason: 'IUPAC 2021 72.630(8) vs older 72.64(1); revised by CIAAW after 2001' },
  Se: { diff: 78.971 - 78.96, reason: 'IUPAC 2021 78.971(8) vs older 78.96(3); revised in the CIAAW 2013 report' },
  Mo: { diff: 95.95 - 95.94, reason: 'IUPAC 2021 95.95(1) vs older 95.94(2); revised by CIAAW (2013 report: 95.96 -> 95.95)' },
  Cd: { diff: 112.414 - 112.411, reason: 'IUPAC 2021 112.414(4) vs older 112.411(8); revised in the CIAAW 2013 report' },
  Nd: { diff: 144.242 - 144.24, reason: 'IUPAC 2021 144.242(3) vs older 144.24(3); revised by CIAAW after 2001' },
  Yb: { diff: 173.045 - 173.04, reason: 'IUPAC 2021 173.045(10) vs older 173.04(3); revised by CIAAW after 2001 (last in 2015)' },
  Lu: { diff: 174.9668 - 174.967, reason: 'IUPAC 2021 174.9668(1) vs older 174.967(1); revised by CIAAW after 2001' },
  Hf: { diff: 178.486 - 178.49, reason: 'IUPAC 2021 178.486(6) vs older 178.49(2); revised by CIAAW in 2019' },
  Pt: { diff: 195.084 - 195.078, reason: 'IUPAC 2021 195.084(9) vs older 195.078(2); revised by CIAAW after 2001' },
  Hg: { diff: 200.592 - 200.59, reason: 'IUPAC 2021 200.592(3) vs older 200.59(2); revised by CIAAW after 2001' },
  Th: { diff: 232.0377 - 232.0381, reason: 'IUPAC 2021 232.0377(4) vs older 232.0381(1); revised in the CIAAW 2013 report' },
  // Mass numbers (no standard atomic weight): the bracketed isotope differs between tables.
  Tc: { diff: 97 - 98, reason: 'Tc-97 and Tc-98 have nearly equal half-lives (~4.2 My, from memory); [97] here, [98] there' },
  Lr: { diff: 266 - 262, reason: 'Lr-266, longer-lived, reported after periodictable\'s (2001-era) data (from memory)' },
  Rf: { diff: 267 - 261, reason: 'Rf-267, longer-lived, reported after periodictable\'s (2001-era) data (from memory)' },
  Db: { diff: 268 - 262, reason: 'Db-268, longer-lived, reported after periodictable\'s (2001-era) data (from memory)' },
  Sg: { diff: 269 - 266, reason: 'Sg-269, longer-lived, reported after periodictable\'s (2001-era) data (from memory)' },
  Bh: { diff: 270 - 264, reason: 'Bh-270, longer-lived, reported after periodictable\'s (2001-era) data (from memory)' },
  Hs: { diff: 269 - 277, reason: 'periodictable lists an unconfirmed long-lived Hs-277; common tables print [269] (from memory)' },
  Mt: { diff: 278 - 268, reason: 'Mt-278, longer-lived, reported after periodictable\'s (2001-era) data (from memory)' },
  Rg: { diff: 282 - 272, reason: 'Rg-282, longer-lived, reported after periodictable\'s (2001-era) data (from memory)' },
  Mc: { diff: 290 - 289, reason: 'Mc-290 is reported longer-lived than Mc-289; tables differ (from memory)' },
};

const PT_TITLE = PT_SKIPPED
  ? 'element table: cross-check against python3-periodictable (optional; SKIPPED: not installed, see the warning)'
  : 'element table: cross-check against python3-periodictable (optional)';

describe.skipIf(PT_SKIPPED)(PT_TITLE, () => {
  it('periodictable gives all 118 elements plus D and T', () => {
    const dump = periodictableDump();
    expect(dump.rows.length).toBe(120); // 118 elements + D + T
    expect(dump.rows.slice(0, 118).map((r) => r.z)).toEqual(Array.from({ length: 118 }, (_, i) => i + 1));
  });

  it('every symbol matches', () => {
    const dump = periodictableDump();
    expect(ELEMENTS.map((e) => e.symbol)).toEqual(dump.rows.map((r) => r.symbol));
    expect(ELEMENTS.map((e) => e.z)).toEqual(dump.rows.map((r) => r.z));
  });

  it('every name matches, apart from the listed spellings', () => {
    const mismatches: string[] = [];
    for (const e of ELEMENTS) {
      const theirs = ptRow(e.symbol).name;
      const known = NAME_SPELLINGS[e.symbol];
      if (known) {
        if (e.name !== known.ours || theirs !== known.periodictable) {
          mismatches.push(`${e.symbol}: listed spelling ${known.ours}/${known.periodictable}, found ${e.name}/${theirs}`);
        }
      } else if (e.name !== theirs) {
        mismatches.push(`${e.symbol}: ours '${e.name}', periodictable '${theirs}'`);
      }
    }
    expect(mismatches).toEqual([]);
  });

  it('every atomic weight agrees within 1e-6 relative, or differs by exactly the listed amount', () => {
    const dump = periodictableDump();
    const problems: string[] = [];
    for (const e of ELEMENTS) {
      const theirs = ptRow(e.symbol).mass;
      const actualDiff = e.atomicWeight - theirs;
      const allowed = ALLOWED_WEIGHT_DIFFERENCES[e.symbol];
      if (allowed) {
        if (Math.abs(actualDiff - allowed.diff) > 1e-9) {
          problems.push(
            `${e.symbol}: ours ${e.atomicWeight}, periodictable ${theirs}: difference ${actualDiff}, ` +
              `listed ${allowed.diff} (${allowed.reason})`,
          );
        }
        if (Math.abs(actualDiff) <= TIGHT_RELATIVE_TOLERANCE * theirs) {
          problems.push(`${e.symbol}: listed as differing but agrees within tolerance; remove it from the list`);
        }
      } else if (Math.abs(actualDiff) > TIGHT_RELATIVE_TOLERANCE * theirs) {
        problems.push(
          `${e.symbol}: ours ${e.atomicWeight}, periodictable ${theirs}: relative difference ` +
            `${(Math.abs(actualDiff) / theirs).toExponential(2)} > ${TIGHT_RELATIVE_TOLERANCE}`,
        );
      }
    }
    expect(problems, `periodictable ${dump.version} at ${dump.python}`).toEqual([]);
  });

  it('periodictable gives a comparable whole mass number for every mass-number element', () => {
    for (const e of ELEMENTS.filter((x) => x.weightKind === 'mass-number')) {
      expect(Number.isInteger(ptRow(e.symbol).mass), e.symbol).toBe(true);
    }
  });
});

describe('element table: the python3-periodictable difference list (always run)', () => {
  it('every listed difference names a known symbol and a reason', () => {
    for (const [symbol, { reason }] of Object.entries(ALLOWED_WEIGHT_DIFFERENCES)) {
      expect(isElementSymbol(symbol), symbol).toBe(true);
      expect(reason.length).toBeGreaterThan(10);
    }
  });
});
