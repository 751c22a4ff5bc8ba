// A small QR code encoder (byte mode, error correction level M, versions 1–15), written for fieldkit
// from the published standard: ISO/IEC 18004:2015 (QR Code bar code symbology specification).
// Tables: number of error correction codewords and blocks per version (Table 9), alignment pattern
// centres (Annex E), format information BCH(15,5) code (7.9), version information BCH(18,6) code (7.10),
// data masks (7.8.2) and their penalty rules (7.8.3). The tests compare its matrices with segno's.

import { s } from "./dom.js";

// Level M, per version: [EC codewords per block, blocks in group 1, data codewords per group-1 block,
// blocks in group 2, data codewords per group-2 block]  (ISO/IEC 18004:2015 Table 9)
const BLOCKS_M = [
  null,
  [10, 1, 16, 0, 0], [16, 1, 28, 0, 0], [26, 1, 44, 0, 0], [18, 2, 32, 0, 0], [24, 2, 43, 0, 0],
  [16, 4, 27, 0, 0], [18, 4, 31, 0, 0], [22, 2, 38, 2, 39], [22, 3, 36, 2, 37], [26, 4, 43, 1, 44],
  [30, 1, 50, 4, 51], [22, 6, 36, 2, 37], [22, 8, 37, 1, 38], [24, 4, 40, 5, 41], [24, 5, 41, 5, 42],
];

// Alignment pattern centre rows/columns (ISO/IEC 18004:2015 Annex E, Table E.1)
const ALIGN = [
  null, [], [6, 18], [6, 22], [6, 26], [6, 30], [6, 34], [6, 22, 38], [6, 24, 42], [6, 26, 46],
  [6, 28, 50], [6, 30, 54], [6, 32, 58], [6, 34, 62], [6, 26, 46, 66], [6, 26, 48, 70],
];

const EC_LEVEL_M_BITS = 0b00; // format information: L=01, M=00, Q=11, H=10 (7.9.1)
const FORMAT_GENERATOR = 0x537; // x^10 + x^8 + x^5 + x^4 + x^2 + x + 1 (7.9.1)
const FORMAT_XOR = 0x5412; // 101010000010010 (7.9.1)
const VERSION_GENERATOR = 0x1f25; // x^12 + x^11 + x^10 + x^9 + x^8 + x^5 + x^2 + 1 (7.10)
const GF_POLY = 0x11d; // x^8 + x^4 + x^3 + x^2 + 1 (7.5.2)

export const MAX_VERSION = 15;

// GF(256) log/antilog tables
const EXP = new Uint8Array(512);
const LOG = new Uint8Array(256);
{
  let x = 1;
  for (let i = 0; i < 255; i++) {
    EXP[i] = x;
    LOG[x] = i;
    x <<= 1;
    if (x & 0x100) x ^= GF_POLY;
  }
  for (let i = 255; i < 512; i++) EXP[i] = EXP[i - 255];
}

function gfMul(a, b) {
  return a === 0 || b === 0 ? 0 : EXP[LOG[a] + LOG[b]];
}

function generatorPoly(degree) {
  let poly = [1]; // coefficients, highest power first
  for (let i = 0; i < degree; i++) {
    const next = new Array(poly.length + 1).fill(0);
    for (let j = 0; j < poly.length; j++) {
      next[j] ^= poly[j];
      next[j + 1] ^= gfMul(poly[j], EXP[i]);
    }
    poly = next;
  }
  return poly;
}

function reedSolomon(data, degree) {
  const gen = generatorPoly(degree);
  const rem = new Array(degree).fill(0);
  for (const b of data) {
    const factor = b ^ rem.shift();
    rem.push(0);
    for (let i = 0; i < degree; i++) rem[i] ^= gfMul(gen[i + 1], factor);
  }
  return rem;
}

function dataCapacity(version) {
  const [, b1, d1, b2, d2] = BLOCKS_M[version];
  return b1 * d1 + b2 * d2;
}

function encodeBits(bytes, version) {
  const cap = dataCapacity(version) * 8;
  const bits = [];
  const put = (value, n) => {
    for (let i = n - 1; i >= 0; i--) bits.push((value >>> i) & 1);
  };
  put(0b0100, 4); // byte mode (7.4.5)
  put(bytes.length, version <= 9 ? 8 : 16); // character count indicator (Table 3)
  for (const b of bytes) put(b, 8);
  if (bits.length > cap) return null;
  put(0, Math.min(4, cap - bits.length)); // terminator
  while (bits.length % 8) bits.push(0);
  for (let pad = 0xec; bits.length < cap; pad ^= 0xec ^ 0x11) put(pad, 8); // 11101100, 00010001
  const out = [];
  for (let i = 0; i < bits.length; i += 8) out.push(bits.slice(i, i + 8).reduce((a, b) => (a << 1) | b, 0));
  return out;
}

function interleave(data, version) {
  const [ec, b1, d1, b2, d2] = BLOCKS_M[version];
  const blocks = [];
  let k = 0;
  for (let i = 0; i < b1 + b2; i++) {
    const n = i < b1 ? d1 : d2;
    const d = data.slice(k, k + n);
    k += n;
    blocks.push({ d, e: reedSolomon(d, ec) });
  }
  const out = [];
  const maxD = Math.max(d1, d2);
  for (let i = 0; i < maxD; i++) for (const b of blocks) if (i < b.d.length) out.push(b.d[i]);
  for (let i = 0; i < ec; i++) for (const b of blocks) out.push(b.e[i]);
  return out;
}

function bchRemainder(value, generator, genDegree) {
  let rem = value << genDegree;
  const top = 1 << genDegree;
  for (let bit = 30; bit >= genDegree; bit--) {
    if (rem & (1 << bit)) rem ^= generator << (bit - genDegree);
  }
  return rem & (top - 1);
}

const MASKS = [
  (i, j) => (i + j) % 2 === 0,
  (i) => i % 2 === 0,
  (_i, j) => j % 3 === 0,
  (i, j) => (i + j) % 3 === 0,
  (i, j) => (Math.floor(i / 2) + Math.floor(j / 3)) % 2 === 0,
  (i, j) => ((i * j) % 2) + ((i * j) % 3) === 0,
  (i, j) => (((i * j) % 2) + ((i * j) % 3)) % 2 === 0,
  (i, j) => (((i + j) % 2) + ((i * j) % 3)) % 2 === 0,
];

function buildMatrix(version, codewords, mask) {
  const n = 17 + 4 * version;
  const m = Array.from({ length: n }, () => new Array(n).fill(false));
  const fn = Array.from({ length: n }, () => new Array(n).fill(false));
  const set = (r, c, dark) => {
    m[r][c] = dark;
    fn[r][c] = true;
  };
  for (let i = 0; i < n; i++) {
    set(6, i, i % 2 === 0);
    set(i, 6, i % 2 === 0);
  }
  for (const [r0, c0] of [[3, 3], [3, n - 4], [n - 4, 3]]) {
    for (let dr = -4; dr <= 4; dr++) {
      for (let dc = -4; dc <= 4; dc++) {
        const r = r0 + dr;
        const c = c0 + dc;
        if (r < 0 || r >= n || c < 0 || c >= n) continue;
        const d = Math.max(Math.abs(dr), Math.abs(dc));
        set(r, c, d !== 2 && d !== 4);
      }
    }
  }
  const al = ALIGN[version];
  for (let a = 0; a < al.length; a++) {
    for (let b = 0; b < al.length; b++) {
      const last = al.length - 1;
      if ((a === 0 && b === 0) || (a === 0 && b === last) || (a === last && b === 0)) continue;
      for (let dr = -2; dr <= 2; dr++) {
        for (let dc = -2; dc <= 2; dc++) set(al[a] + dr, al[b] + dc, Math.max(Math.abs(dr), Math.abs(dc)) !== 1);
      }
    }
  }
  // Format information (7.9), both copies, and the dark module.
  const fmtData = (EC_LEVEL_M_BITS << 3) | mask;
  const fmt = ((fmtData << 10) | bchRemainder(fmtData, FORMAT_GENERATOR, 10)) ^ FORMAT_XOR;
  const bit = (v, i) => ((v >>> i) & 1) === 1;
  for (let i = 0; i <= 5; i++) set(i, 8, bit(fmt, i));
  set(7, 8, bit(fmt, 6));
  set(8, 8, bit(fmt, 7));
  set(8, 7, bit(fmt, 8));
  for (let i = 9; i < 15; i++) set(8, 14 - i, bit(fmt, i));
  for (let i = 0; i < 8; i++) set(8, n - 1 - i, bit(fmt, i));
  for (let i = 8; i < 15; i++) set(n - 15 + i, 8, bit(fmt, i));
  set(n - 8, 8, true);
  // Version information (7.10) for version 7 and up.
  if (version >= 7) {
    const ver = (version << 12) | bchRemainder(version, VERSION_GENERATOR, 12);
    for (let i = 0; i < 18; i++) {
      const a = n - 11 + (i % 3);
      const b = Math.floor(i / 3);
      set(b, a, bit(ver, i));
      set(a, b, bit(ver, i));
    }
  }
  // Data in two-module columns, zig-zag from the bottom right, skipping the vertical timing column (7.7.3).
  const bits = [];
  for (const cw of codewords) for (let i = 7; i >= 0; i--) bits.push((cw >>> i) & 1);
  let k = 0;
  for (let right = n - 1; right >= 1; right -= 2) {
    if (right === 6) right = 5;
    const upward = ((right + 1) & 2) === 0;
    for (let v = 0; v < n; v++) {
      const r = upward ? n - 1 - v : v;
      for (let j = 0; j < 2; j++) {
        const c = right - j;
        if (fn[r][c]) continue;
        const dark = k < bits.length ? bits[k] === 1 : false; // remainder bits are 0
        k++;
        m[r][c] = dark !== MASKS[mask](r, c);
      }
    }
  }
  return m;
}

/** Penalty score of a masked symbol (ISO/IEC 18004:2015 7.8.3, rules N1–N4). */
function penalty(m) {
  const n = m.length;
  let score = 0;
  const lines = [];
  for (let i = 0; i < n; i++) {
    lines.push(m[i]);
    lines.push(m.map((row) => row[i]));
  }
  const finderA = [1, 0, 1, 1, 1, 0, 1, 0, 0, 0, 0];
  const finderB = [0, 0, 0, 0, 1, 0, 1, 1, 1, 0, 1];
  for (const line of lines) {
    let run = 1;
    for (let i = 1; i <= n; i++) {
      if (i < n && line[i] === line[i - 1]) run++;
      else {
        if (run >= 5) score += 3 + (run - 5); // N1
        run = 1;
      }
    }
    for (let i = 0; i + 11 <= n; i++) {
      let a = true;
      let b = true;
      for (let j = 0; j < 11; j++) {
        const v = line[i + j] ? 1 : 0;
        if (v !== finderA[j]) a = false;
        if (v !== finderB[j]) b = false;
      }
      if (a) score += 40; // N3
      if (b) score += 40;
    }
  }
  let dark = 0;
  for (let r = 0; r < n; r++) {
    for (let c = 0; c < n; c++) {
      if (m[r][c]) dark++;
      if (r + 1 < n && c + 1 < n && m[r][c] === m[r][c + 1] && m[r][c] === m[r + 1][c] && m[r][c] === m[r + 1][c + 1]) score += 3; // N2
    }
  }
  const total = n * n;
  score += 10 * Math.floor(Math.abs(dark * 20 - total * 10) / total); // N4: 10 points per 5 % from half
  return score;
}

/**
 * Encode text (UTF-8, byte mode, level M) into a QR code.
 * @param {string} text
 * @param {{mask?: number, version?: number}} [opts] force a mask (0–7) or a version (1–15)
 * @returns {{version: number, mask: number, size: number, modules: boolean[][]}}
 */
export function encodeQr(text, opts = {}) {
  const bytes = [...new TextEncoder().encode(text)];
  let version = opts.version ?? 0;
  let data = null;
  if (version) data = encodeBits(bytes, version);
  else {
    for (version = 1; version <= MAX_VERSION; version++) {
      data = encodeBits(bytes, version);
      if (data) break;
    }
  }
  if (!data) throw new Error(`text too long for a QR code of version ${MAX_VERSION} (${bytes.length} bytes)`);
  const codewords = interleave(data, version);
  let best = null;
  const masks = opts.mask === undefined ? [0, 1, 2, 3, 4, 5, 6, 7] : [opts.mask];
  for (const mask of masks) {
    const modules = buildMatrix(version, codewords, mask);
    const p = masks.length > 1 ? penalty(modules) : 0;
    if (!best || p < best.p) best = { p, mask, modules };
  }
  return { version, mask: best.mask, size: best.modules.length, modules: best.modules };
}

/** An SVG of the code with the 4-module quiet zone the standard asks for (7.3.7). */
export function qrSvg(text, { label = "QR code", testid = null } = {}) {
  const q = encodeQr(text);
  const quiet = 4;
  const dim = q.size + 2 * quiet;
  let d = "";
  for (let r = 0; r < q.size; r++) {
    for (let c = 0; c < q.size; c++) if (q.modules[r][c]) d += `M${c + quiet} ${r + quiet}h1v1h-1z`;
  }
  return s("svg", { viewBox: `0 0 ${dim} ${dim}`, class: "qr", role: "img", "aria-label": label, "data-testid": testid, "shape-rendering": "crispEdges", "data-version": q.version }, [
    s("rect", { x: 0, y: 0, width: dim, height: dim, class: "qr-bg" }),
    s("path", { d, class: "qr-fg" }),
  ]);
}
