/**
 * The gate that drops the viewer library's unseen off-screen passes (components/viewer/gl-gate.ts),
 * on a recording stand-in for a WebGL2 context: what reaches the context while the gate is shut or
 * the idle program is bound, and that everything reaches it again afterwards. A dropped
 * checkFramebufferStatus answers FRAMEBUFFER_COMPLETE, 0x8CD5 in WebGL's constants (WebGL 1.0
 * specification, §5.14, the WebGLRenderingContextBase IDL), which is what the library's passes
 * expect in order to go on. */
import { describe, expect, it } from 'vitest';
import { idleWhileBound, withoutPasses } from '@/components/viewer/gl-gate';

function context() {
  const calls: string[] = [];
  const gl = {
    FRAMEBUFFER_COMPLETE: 0x8cd5,
    useProgram: (p: unknown) => calls.push(`use ${String((p as { name?: string } | null)?.name)}`),
    drawArrays: () => calls.push('draw'),
    checkFramebufferStatus: () => {
      calls.push('check');
      return 0x8cd6; // incomplete attachment: tells a real answer from the gate's
    },
    framebufferTextureLayer: () => calls.push('attach'),
  };
  return { gl: gl as unknown as WebGL2RenderingContext, calls };
}

const pass = (gl: WebGL2RenderingContext) => {
  gl.framebufferTextureLayer(0, 0, null, 0, 0);
  const status = gl.checkFramebufferStatus(0);
  gl.drawArrays(0, 0, 4);
  return status;
};

describe('the off-screen pass gate', () => {
  it('drops the passes run with the idle program and lets other programs draw', () => {
    const { gl, calls } = context();
    const idle = { name: 'idle' } as unknown as WebGLProgram;
    const slice = { name: 'slice' } as unknown as WebGLProgram;
    idleWhileBound(gl, idle);
    gl.useProgram(idle);
    expect(pass(gl)).toBe(0x8cd5);
    gl.useProgram(slice);
    expect(pass(gl)).toBe(0x8cd6);
    expect(calls).toEqual(['use idle', 'use slice', 'attach', 'check', 'draw']);
  });

  it('drops every pass while shut, opens again afterwards and after a throw, and nests', () => {
    const { gl, calls } = context();
    withoutPasses(gl, () => {
      pass(gl);
      withoutPasses(gl, () => pass(gl));
      pass(gl);
    });
    expect(calls).toEqual([]);
    expect(() =>
      withoutPasses(gl, () => {
        throw new Error('boom');
      }),
    ).toThrow('boom');
    expect(pass(gl)).toBe(0x8cd6);
    expect(calls).toEqual(['attach', 'check', 'draw']);
  });

  it('wraps a context once, however often it is asked', () => {
    const { gl, calls } = context();
    const idle = {} as WebGLProgram;
    idleWhileBound(gl, idle);
    const draw = gl.drawArrays;
    idleWhileBound(gl, idle);
    withoutPasses(gl, () => undefined);
    expect(gl.drawArrays).toBe(draw);
    gl.drawArrays(0, 0, 4);
    expect(calls).toEqual(['draw']);
  });
});
