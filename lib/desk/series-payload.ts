/**
 * The desk's series payload: every listed component's time course and power spectrum (with its
 * frequencies) in one binary message, so the page itself carries only the shown component's series
 * and a switch never waits for the network. Little-endian float32 (the precision the server stores);
 * no Node or browser APIs, so the server encodes and the browser decodes the same bytes.
 *   "QSR1" · u32 count · (u32 componentId · u32 nTime · u32 nFreq)[count]
 *   · per component: f32 timecourse[nTime] · f32 spectrum[nFreq] · f32 frequencies[nFreq]
 * Values that are not finite are stored as they are (the charts leave them out).
 */
import type { ComponentSeries } from './types';

export const SERIES_MAGIC = 'QSR1';

/** The payload's address for a run and its decomposition (a new decomposition is a new address); the desk page preloads it. */
export const deskSeriesUrl = (runId: number, decompositionId: number) => `/api/runs/${runId}/series?d=${decompositionId}`;
const FIXED = 8;
const PER_COMPONENT = 12;
/** A run has at most a few hundred components of at most a few thousand volumes: a bound for a damaged message. */
const MAX_VALUES = 50_000_000;

class SeriesPayloadError extends Error {}

export function encodeSeries(components: ReadonlyArray<{ id: number } & ComponentSeries>): Uint8Array {
  for (const c of components) {
    if (c.spectrum.length !== c.frequencies.length) {
      throw new Error(`component ${c.id}: ${c.spectrum.length} spectrum values for ${c.frequencies.length} frequencies`);
    }
  }
  const values = components.reduce((n, c) => n + c.timecourse.length + 2 * c.spectrum.length, 0);
  const bytes = new Uint8Array(FIXED + PER_COMPONENT * components.length + 4 * values);
  const view = new DataView(bytes.buffer);
  for (let i = 0; i < 4; i++) view.setUint8(i, SERIES_MAGIC.charCodeAt(i));
  view.setUint32(4, components.length, true);
  let o = FIXED;
  for (const c of components) {
    view.setUint32(o, c.id, true);
    view.setUint32(o + 4, c.timecourse.length, true);
    view.setUint32(o + 8, c.spectrum.length, true);
    o += PER_COMPONENT;
  }
  for (const c of components) {
    for (const list of [c.timecourse, c.spectrum, c.frequencies]) {
      for (let i = 0; i < list.length; i++, o += 4) view.setFloat32(o, list[i]!, true);
    }
  }
  return bytes;
}

/** The decoded payload: a component's series by its id (plain arrays, made on first use), or null when it is not in it. */
export type SeriesSource = { count: number; of: (componentId: number) => ComponentSeries | null };

/** Reads a series payload; throws an Error saying what is wrong when the bytes are not one. */
export function decodeSeries(bytes: Uint8Array): SeriesSource {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const fail = (what: string): never => {
    throw new SeriesPayloadError(`the series payload is damaged (${what})`);
  };
  if (bytes.byteLength < FIXED) fail('too short');
  const magic = String.fromCharCode(view.getUint8(0), view.getUint8(1), view.getUint8(2), view.getUint8(3));
  if (magic !== SERIES_MAGIC) fail(`it starts with ${JSON.stringify(magic)}, not ${SERIES_MAGIC}`);
  const count = view.getUint32(4, true);
  if (FIXED + PER_COMPONENT * count > bytes.byteLength) fail(`${count} components do not fit in ${bytes.byteLength} bytes`);
  const at = new Map<number, { offset: number; nTime: number; nFreq: number }>();
  let o = FIXED + PER_COMPONENT * count;
  let values = 0;
  for (let c = 0; c < count; c++) {
    const h = FIXED + PER_COMPONENT * c;
    const nTime = view.getUint32(h + 4, true);
    const nFreq = view.getUint32(h + 8, true);
    values += nTime + 2 * nFreq;
    if (values > MAX_VALUES) fail('implausibly long series');
    at.set(view.getUint32(h, true), { offset: o, nTime, nFreq });
    o += 4 * (nTime + 2 * nFreq);
  }
  if (o !== bytes.byteLength) fail(`${bytes.byteLength} bytes where ${o} were announced`);
  const read = (offset: number, n: number) => {
    const out = new Array<number>(n);
    for (let i = 0; i < n; i++) out[i] = view.getFloat32(offset + 4 * i, true);
    return out;
  };
  const made = new Map<number, ComponentSeries>();
  return {
    count,
    of(componentId) {
      const done = made.get(componentId);
      if (done) return done;
      const e = at.get(componentId);
      if (!e) return null;
      const series = {
        timecourse: read(e.offset, e.nTime),
        spectrum: read(e.offset + 4 * e.nTime, e.nFreq),
        frequencies: read(e.offset + 4 * (e.nTime + e.nFreq), e.nFreq),
      };
      made.set(componentId, series);
      return series;
    },
  };
}
