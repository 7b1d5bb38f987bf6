/**
 * Programs compiled when first drawn with (components/viewer/lazy-programs.ts), on a recording
 * stand-in for a WebGL2 context. What the layer must keep is WebGL 2.0's contract as the page sees
 * it (Khronos WebGL 2.0 specification, §3.7.8 and §3.7.11, and OpenGL ES 3.0 specification §2.12 and
 * §2.12.6 "Uniform Variables"): a uniform call sets the value in the program bound at the time; a
 * location that is null is silently ignored; a draw uses the bound program. The browser tests (desk
 * and run view) draw through the layer with the real viewer library in Chromium.
 */
import { afterEach, describe, expect, it, vi } from 'vitest';
import { deferPrograms } from '@/components/viewer/lazy-programs';

type Obj = { name: string };

/** A context that records the calls reaching it; `broken` programs fail to link. */
class Recorder {
  LINK_STATUS = 0x8b82;
  COMPILE_STATUS = 0x8b81;
  calls: string[] = [];
  broken = new Set<string>();
  linked = new Set<string>();
  shaderSource(s: Obj, src: string) {
    this.calls.push(`source ${s.name} ${src}`);
  }
  getShaderSource() {
    return 'sent';
  }
  compileShader(s: Obj) {
    this.calls.push(`compile ${s.name}`);
  }
  attachShader(p: Obj, s: Obj) {
    this.calls.push(`attach ${p.name} ${s.name}`);
  }
  linkProgram(p: Obj) {
    this.calls.push(`link ${p.name}`);
    if (!this.broken.has(p.name)) this.linked.add(p.name);
  }
  deleteShader(s: Obj) {
    this.calls.push(`delete ${s.name}`);
  }
  deleteProgram(p: Obj | null) {
    this.calls.push(`deleteProgram ${p?.name}`);
  }
  useProgram(p: Obj | null) {
    this.calls.push(`use ${p?.name ?? 'none'}`);
  }
  getProgramParameter(p: Obj) {
    this.calls.push(`status ${p.name}`);
    return this.linked.has(p.name);
  }
  getShaderParameter(s: Obj) {
    this.calls.push(`compiled? ${s.name}`);
    return true;
  }
  getShaderInfoLog() {
    return '';
  }
  getProgramInfoLog() {
    return 'link error';
  }
  getUniformLocation(p: Obj, name: string) {
    this.calls.push(`where ${p.name}.${name}`);
    return name === 'unused' ? null : { at: `${p.name}.${name}` };
  }
  getUniform() {
    return 0;
  }
  getAttribLocation(p: Obj, name: string) {
    this.calls.push(`attrib ${p.name}.${name}`);
    return 0;
  }
  uniform1f(l: { at: string } | null, v: number) {
    this.calls.push(`set ${l?.at ?? 'null'} ${v}`);
  }
  uniform4fv(l: { at: string } | null, v: Float32Array) {
    this.calls.push(`set ${l?.at ?? 'null'} [${Array.from(v).join(',')}]`);
  }
  drawArrays() {
    this.calls.push('draw');
  }
  drawElements() {
    this.calls.push('drawElements');
  }
}

/** A context with the layer on it and one program `name` made as the viewer library makes its own. */
function setUp() {
  const rec = new Recorder();
  const gl = rec as unknown as WebGL2RenderingContext;
  deferPrograms(gl);
  const make = (name: string) => {
    const p = { name } as unknown as WebGLProgram;
    const vs = { name: `${name}.vs` } as unknown as WebGLShader;
    const fs = { name: `${name}.fs` } as unknown as WebGLShader;
    gl.shaderSource(vs, 'v');
    gl.shaderSource(fs, 'f');
    gl.compileShader(vs);
    gl.compileShader(fs);
    gl.attachShader(p, vs);
    gl.attachShader(p, fs);
    gl.linkProgram(p);
    const ok = gl.getProgramParameter(p, gl.LINK_STATUS) as boolean;
    return { p, vs, fs, ok };
  };
  return { rec, gl, make };
}

afterEach(() => vi.restoreAllMocks());

describe('programs compiled when first drawn with', () => {
  it('makes a program without compiling or linking it, and answers as one that linked', () => {
    const { rec, gl, make } = setUp();
    const { ok, vs } = make('slice');
    expect(ok).toBe(true);
    expect(gl.getShaderParameter(vs, gl.COMPILE_STATUS)).toBe(true);
    expect(rec.calls).toEqual(['attach slice slice.vs', 'attach slice slice.fs']); // no source sent, nothing compiled
  });

  it('links at the first draw and replays the uniforms set meanwhile, in order, on real locations', () => {
    const { rec, gl, make } = setUp();
    const { p } = make('slice');
    const colour = gl.getUniformLocation(p, 'colour');
    const opacity = gl.getUniformLocation(p, 'opacity');
    gl.useProgram(p);
    const v = new Float32Array([1, 2, 3, 4]);
    gl.uniform4fv(colour, v);
    v[0] = 9; // callers reuse their arrays: the value set is the one at the call
    gl.uniform1f(opacity, 0.5);
    gl.uniform1f(opacity, 0.75);
    rec.calls = [];
    gl.drawArrays(gl.TRIANGLE_STRIP, 0, 4);
    expect(rec.calls).toEqual([
      'source slice.vs v', // the sources too are sent only now
      'compile slice.vs',
      'source slice.fs f',
      'compile slice.fs',
      'link slice',
      'status slice',
      'use slice',
      'where slice.colour',
      'set slice.colour [1,2,3,4]',
      'where slice.opacity',
      'set slice.opacity 0.5',
      'set slice.opacity 0.75',
      'draw',
    ]);
    rec.calls = [];
    gl.uniform1f(opacity, 1); // linked now: straight through, the location already known
    gl.drawArrays(gl.TRIANGLE_STRIP, 0, 4);
    expect(rec.calls).toEqual(['set slice.opacity 1', 'draw']);
  });

  it('never compiles a program nothing draws with', () => {
    const { rec, gl, make } = setUp();
    const used = make('slice').p;
    make('meshes');
    make('volume-render');
    gl.useProgram(used);
    gl.drawArrays(gl.TRIANGLE_STRIP, 0, 4);
    expect(rec.calls.filter((c) => c.startsWith('compile') || c.startsWith('link'))).toEqual([
      'compile slice.vs',
      'compile slice.fs',
      'link slice',
    ]);
  });

  it('passes a location the compiler dropped as null, which the context ignores', () => {
    const { rec, gl, make } = setUp();
    const { p } = make('slice');
    const unused = gl.getUniformLocation(p, 'unused');
    expect(unused).toBeTruthy(); // a stand-in until the link: truthy, unlike the real null
    gl.useProgram(p);
    gl.uniform1f(unused, 3);
    gl.drawArrays(gl.TRIANGLE_STRIP, 0, 4);
    expect(rec.calls).toContain('set null 3');
  });

  it('links first for a question only a linked program can answer, and before a shader is deleted', () => {
    const { rec, gl, make } = setUp();
    const a = make('a');
    gl.getAttribLocation(a.p, 'pos');
    expect(rec.calls.slice(-2)).toEqual(['status a', 'attrib a.pos']);
    const b = make('b');
    rec.calls = [];
    gl.deleteShader(b.vs);
    expect(rec.calls).toEqual(['source b.vs v', 'compile b.vs', 'delete b.vs']);
    gl.useProgram(b.p);
    gl.drawElements(gl.TRIANGLES, 6, gl.UNSIGNED_INT, 0);
    expect(rec.calls.filter((c) => c.startsWith('compile'))).toEqual(['compile b.vs', 'compile b.fs']); // b.vs once
  });

  it('reports a program that fails to link when it is first drawn with', () => {
    const { rec, gl, make } = setUp();
    rec.broken.add('bad');
    const { p, ok } = make('bad');
    expect(ok).toBe(true); // not known until the link
    const error = vi.spyOn(console, 'error').mockImplementation(() => undefined);
    gl.useProgram(p);
    gl.drawArrays(gl.TRIANGLE_STRIP, 0, 4);
    expect(error).toHaveBeenCalledWith('A viewer shader failed to link:', 'link error');
    expect(rec.calls).not.toContain('use bad'); // no program bound: WebGL draws nothing
    expect(rec.calls.at(-1)).toBe('draw');
    expect(gl.getProgramParameter(p, gl.LINK_STATUS)).toBe(false); // the real answer from now on
  });

  it('binds other programs straight away and keeps the page’s binding across a link', () => {
    const { rec, gl, make } = setUp();
    const a = make('a').p;
    const b = make('b').p;
    gl.useProgram(a);
    gl.drawArrays(gl.TRIANGLE_STRIP, 0, 4); // a linked
    gl.useProgram(b);
    gl.uniform1f(gl.getUniformLocation(b, 'x'), 1);
    gl.useProgram(a); // a is linked: bound at once; b keeps its queued uniform
    rec.calls = [];
    gl.getAttribLocation(b, 'pos'); // links b and replays its uniform, then gives the binding back to a
    expect(rec.calls).toEqual([
      'source b.vs v',
      'compile b.vs',
      'source b.fs f',
      'compile b.fs',
      'link b',
      'status b',
      'use b',
      'where b.x',
      'set b.x 1',
      'use a',
      'attrib b.pos',
    ]);
  });
});
