/**
 * A gate on one WebGL context's off-screen passes: while it is shut, the per-slice attach, the
 * framebuffer completeness check and the draw calls are dropped. The viewer shuts it for passes of
 * the viewer library whose result it never shows or overwrites at once (skip-gradient-pass.ts, and
 * the map layer's GPU blend at load, replaced by cpu-blend.ts). In software WebGL each of those
 * passes is one render pass per slice, and each completeness check makes the page wait for the GPU
 * process to finish everything before it (≈ 60 ms at a load on the bench run).
 *
 * While shut, every drawArrays call is dropped, on screen or not: shut it only around work that
 * draws nothing on screen. Installed once per context by shadowing four of its methods on the
 * instance (not the prototype): other contexts on the page are untouched.
 */
type Gate = { shut: number; idleProgram: WebGLProgram | null; bound: WebGLProgram | null };

const gates = new WeakMap<WebGL2RenderingContext, Gate>();

function gateOf(gl: WebGL2RenderingContext): Gate {
  const known = gates.get(gl);
  if (known) return known;
  const gate: Gate = { shut: 0, idleProgram: null, bound: null };
  gates.set(gl, gate);
  const skipping = () => gate.shut > 0 || (gate.idleProgram !== null && gate.bound === gate.idleProgram);
  const useProgram = gl.useProgram.bind(gl);
  const drawArrays = gl.drawArrays.bind(gl);
  const checkFramebufferStatus = gl.checkFramebufferStatus.bind(gl);
  const framebufferTextureLayer = gl.framebufferTextureLayer.bind(gl);
  Object.assign(gl, {
    useProgram(program: WebGLProgram | null) {
      gate.bound = program;
      useProgram(program);
    },
    drawArrays(mode: GLenum, first: GLint, count: GLsizei) {
      if (!skipping()) drawArrays(mode, first, count);
    },
    checkFramebufferStatus(target: GLenum): GLenum {
      return skipping() ? gl.FRAMEBUFFER_COMPLETE : checkFramebufferStatus(target);
    },
    framebufferTextureLayer(target: GLenum, attachment: GLenum, texture: WebGLTexture | null, level: GLint, layer: GLint) {
      if (!skipping()) framebufferTextureLayer(target, attachment, texture, level, layer);
    },
  });
  return gate;
}

/** While `program` is bound, the context's off-screen passes are dropped (a pass run with it does nothing). */
export function idleWhileBound(gl: WebGL2RenderingContext, program: WebGLProgram) {
  gateOf(gl).idleProgram = program;
}

/** Runs `fn` with the context's off-screen passes dropped; the gate opens again afterwards, even on a throw. */
export function withoutPasses<T>(gl: WebGL2RenderingContext, fn: () => T): T {
  const gate = gateOf(gl);
  gate.shut++;
  try {
    return fn();
  } finally {
    gate.shut--;
  }
}
