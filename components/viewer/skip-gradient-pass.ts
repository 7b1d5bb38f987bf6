import type { Niivue } from '@niivue/niivue';
import { idleWhileBound } from './gl-gate';

// Off-screen: every vertex lies outside the clip volume, so no fragment is ever shaded.
const VERT = `#version 300 es
layout(location=0) in vec3 vPos;
void main() { gl_Position = vec4(2.0, 2.0, 2.0, 1.0); }`;
const FRAG = `#version 300 es
precision mediump float;
out vec4 color;
void main() { color = vec4(0.0); }`;

/**
 * The viewer library computes a gradient texture of the underlay every time the underlay's layer is
 * blended: two shader passes over every slice, used only to shade 3D renderings, which the desk and
 * the run view never show (three planes or a mosaic of slices). In software WebGL that costs
 * ≈ 0.3–0.7 s at each load and underlay swap. This swaps the four shaders of that pass for one that
 * draws nothing, and while that one is bound the context drops the pass's per-slice attach, check
 * and draw (gl-gate.ts): the pass leaves an empty gradient texture and costs almost nothing. Tied to the
 * library's internals at its pinned version (the shaders are fields named blurShader,
 * gradientPrePassShader, sobelFirstOrderShader and sobelSecondOrderShader, each used through `use(gl)`
 * and `uniforms`); if the fields are not there, nothing is changed. Call after attachToCanvas.
 */
export function skipGradientPass(nv: Niivue): boolean {
  const gl = nv.gl as WebGL2RenderingContext | null;
  const fields = ['blurShader', 'gradientPrePassShader', 'sobelFirstOrderShader', 'sobelSecondOrderShader'] as const;
  const target = nv as unknown as Record<(typeof fields)[number], unknown>;
  if (!gl || fields.some((f) => !target[f])) return false;
  const program = compile(gl);
  if (!program) return false;
  // uniforms: none; the library's uniform calls then get a null location, which WebGL ignores
  const nothing = { program, uniforms: {}, use: (g: WebGL2RenderingContext) => g.useProgram(program) };
  idleWhileBound(gl, program);
  for (const f of fields) target[f] = nothing;
  return true;
}

function compile(gl: WebGL2RenderingContext): WebGLProgram | null {
  const program = gl.createProgram();
  const shaders: WebGLShader[] = [];
  for (const [type, src] of [
    [gl.VERTEX_SHADER, VERT],
    [gl.FRAGMENT_SHADER, FRAG],
  ] as const) {
    const s = gl.createShader(type);
    if (!s) return null;
    gl.shaderSource(s, src);
    gl.compileShader(s);
    gl.attachShader(program, s);
    shaders.push(s);
  }
  gl.bindAttribLocation(program, 0, 'vPos');
  gl.linkProgram(program);
  for (const s of shaders) gl.deleteShader(s);
  return gl.getProgramParameter(program, gl.LINK_STATUS) ? program : null;
}
