/**
 * Compiles a WebGL program the first time something is drawn with it, not when it is made.
 *
 * The viewer library compiles and links all of its ≈ 37 shader programs when it starts (3D
 * rendering, meshes, drawing tools, …), and asks for each link's result at once, so the page waits
 * for every one of them. The desk draws with about six. With this layer the desk's first load in
 * software WebGL went from 2.78 to 2.19 s in a fresh browser and from 1.44 to 1.34 s warm (medians of
 * 5 and 10 alternated loads on the bench run, 2026-12-03). This layer, put on one context before the
 * library uses it, lets the library make its programs as before but holds back the shader sources,
 * the compile and the link until the first draw with the program bound (or a question only a linked program can answer).
 *
 * Until then it answers as a program that linked: getProgramParameter(LINK_STATUS) and
 * getShaderParameter(COMPILE_STATUS) are true, getUniformLocation gives a stand-in location, the
 * held program counts as bound after useProgram, and uniform calls on it are recorded and replayed,
 * in order, once it is linked. A program that then fails to link is reported on the console, as the library does, and
 * draws nothing. Stand-in locations are always truthy (a real one is null for a uniform the compiler
 * dropped); a uniform call with one that resolves to null does nothing, as WebGL specifies.
 *
 * Shadows methods on the context instance (not the prototype): other contexts are untouched.
 */

type Held = {
  shaders: WebGLShader[];
  /** uniform calls made while held, replayed in order after the link */
  queue: Array<[setter: (...a: unknown[]) => unknown, location: Stand, args: unknown[]]>;
  locations: Map<string, Stand>;
};

class Stand {
  resolved = false;
  real: WebGLUniformLocation | null = null;
  constructor(
    readonly program: WebGLProgram,
    readonly name: string,
  ) {}
}

const DRAWS = ['drawArrays', 'drawElements', 'drawArraysInstanced', 'drawElementsInstanced', 'drawRangeElements'] as const;
/** program queries that need the linked program */
const QUERIES = [
  'getAttribLocation',
  'getActiveAttrib',
  'getActiveUniform',
  'getActiveUniforms',
  'getActiveUniformBlockName',
  'getActiveUniformBlockParameter',
  'getAttachedShaders',
  'getFragDataLocation',
  'getProgramInfoLog',
  'getTransformFeedbackVarying',
  'getUniformBlockIndex',
  'getUniformIndices',
  'uniformBlockBinding',
  'validateProgram',
] as const;

const deferred = new WeakSet<object>();

/** Puts the layer on the WebGL2 context the viewer library will make on `canvas` (call before attachToCanvas). */
export function deferProgramsOn(canvas: HTMLCanvasElement) {
  const getContext = canvas.getContext.bind(canvas) as (type: string, attributes?: unknown) => RenderingContext | null;
  canvas.getContext = ((type: string, attributes?: unknown) => {
    const context = getContext(type, attributes);
    if (type === 'webgl2' && context && !deferred.has(context)) {
      deferred.add(context);
      deferPrograms(context as WebGL2RenderingContext);
    }
    return context;
  }) as HTMLCanvasElement['getContext'];
}

export function deferPrograms(gl: WebGL2RenderingContext) {
  const real = {
    shaderSource: gl.shaderSource.bind(gl),
    compileShader: gl.compileShader.bind(gl),
    linkProgram: gl.linkProgram.bind(gl),
    attachShader: gl.attachShader.bind(gl),
    deleteShader: gl.deleteShader.bind(gl),
    deleteProgram: gl.deleteProgram.bind(gl),
    useProgram: gl.useProgram.bind(gl),
    getProgramParameter: gl.getProgramParameter.bind(gl),
    getShaderParameter: gl.getShaderParameter.bind(gl),
    getUniformLocation: gl.getUniformLocation.bind(gl),
    getUniform: gl.getUniform.bind(gl),
    getShaderSource: gl.getShaderSource.bind(gl),
    getShaderInfoLog: gl.getShaderInfoLog.bind(gl),
  };
  const held = new Map<WebGLProgram, Held>();
  const uncompiled = new Set<WebGLShader>();
  const attached = new Map<WebGLProgram, WebGLShader[]>();
  let current: WebGLProgram | null = null;
  let boundHeld = false; // `current` is held: the context has some other program bound (or none)
  let realBound: WebGLProgram | null = null; // the program the context itself has bound
  const bindReal = (program: WebGLProgram | null) => {
    if (program === realBound) return;
    realBound = program;
    real.useProgram(program);
  };

  const sources = new Map<WebGLShader, string>(); // sent with the compile: most are never compiled
  const compile = (shader: WebGLShader) => {
    const source = sources.get(shader);
    if (source !== undefined) {
      sources.delete(shader);
      real.shaderSource(shader, source);
    }
    if (!uncompiled.delete(shader)) return;
    real.compileShader(shader);
  };
  const locationOf = (stand: Stand) => {
    if (!stand.resolved) {
      stand.real = real.getUniformLocation(stand.program, stand.name);
      stand.resolved = true;
    }
    return stand.real;
  };
  /** Compiles and links a held program, then replays what was asked of it; true when it is usable. */
  const realise = (program: WebGLProgram) => {
    const h = held.get(program);
    if (!h) return true;
    held.delete(program);
    for (const s of h.shaders) compile(s);
    real.linkProgram(program);
    const ok = Boolean(real.getProgramParameter(program, gl.LINK_STATUS));
    if (!ok) console.error('A viewer shader failed to link:', gl.getProgramInfoLog(program));
    if (ok && h.queue.length) {
      bindReal(program);
      for (const [setter, stand, args] of h.queue) setter(locationOf(stand), ...args);
      if (current !== null && !held.has(current)) bindReal(current); // as the page left it
    }
    return ok;
  };
  /** Binds the program the page asked for, linking it first if it was held. */
  const bindCurrent = () => {
    if (!boundHeld || current === null) return;
    boundHeld = false;
    bindReal(realise(current) ? current : null); // a program that failed to link: nothing is drawn
  };

  const ctx = gl as unknown as Record<string, unknown>;
  Object.assign(ctx, {
    shaderSource(shader: WebGLShader, source: string) {
      sources.set(shader, source);
    },
    getShaderSource(shader: WebGLShader) {
      compile(shader);
      return real.getShaderSource(shader);
    },
    compileShader(shader: WebGLShader) {
      uncompiled.add(shader);
    },
    attachShader(program: WebGLProgram, shader: WebGLShader) {
      attached.set(program, [...(attached.get(program) ?? []), shader]);
      real.attachShader(program, shader);
    },
    linkProgram(program: WebGLProgram) {
      held.set(program, { shaders: attached.get(program) ?? [], queue: [], locations: new Map() });
    },
    deleteShader(shader: WebGLShader) {
      compile(shader); // a held program may still need it: compiled before it goes
      real.deleteShader(shader);
    },
    deleteProgram(program: WebGLProgram | null) {
      if (program) {
        held.delete(program);
        attached.delete(program);
        if (current === program) current = null;
        if (realBound === program) realBound = null;
      }
      real.deleteProgram(program);
    },
    useProgram(program: WebGLProgram | null) {
      current = program;
      boundHeld = program !== null && held.has(program);
      if (!boundHeld) {
        realBound = program;
        real.useProgram(program); // always passed on, as the page may rely on the call itself
      }
    },
    getProgramParameter(program: WebGLProgram, pname: GLenum) {
      if (held.has(program) && pname === gl.LINK_STATUS) return true;
      realise(program);
      return real.getProgramParameter(program, pname);
    },
    getShaderParameter(shader: WebGLShader, pname: GLenum) {
      if (uncompiled.has(shader) && pname === gl.COMPILE_STATUS) return true;
      compile(shader);
      return real.getShaderParameter(shader, pname);
    },
    getShaderInfoLog(shader: WebGLShader) {
      compile(shader);
      return real.getShaderInfoLog(shader);
    },
    getUniformLocation(program: WebGLProgram, name: string) {
      const h = held.get(program);
      if (!h) return real.getUniformLocation(program, name);
      let stand = h.locations.get(name);
      if (!stand) {
        stand = new Stand(program, name);
        h.locations.set(name, stand);
      }
      return stand;
    },
    getUniform(program: WebGLProgram, location: WebGLUniformLocation) {
      realise(program);
      return real.getUniform(program, location instanceof Stand ? locationOf(location)! : location);
    },
  });
  for (const name of QUERIES) {
    if (typeof gl[name] !== 'function') continue;
    const orig = (gl[name] as (...a: unknown[]) => unknown).bind(gl);
    ctx[name] = (program: WebGLProgram, ...rest: unknown[]) => {
      realise(program);
      return orig(program, ...rest);
    };
  }
  for (const name of DRAWS) {
    if (typeof gl[name] !== 'function') continue;
    const orig = (gl[name] as (...a: unknown[]) => unknown).bind(gl);
    ctx[name] = (...args: unknown[]) => {
      bindCurrent();
      return orig(...args);
    };
  }
  // every uniform setter: a stand-in location is resolved, or the call waits for the link
  for (const name of Object.getOwnPropertyNames(Object.getPrototypeOf(gl) as object)) {
    if (!/^uniform(\d|Matrix)/.test(name)) continue;
    const orig = (gl[name as keyof WebGL2RenderingContext] as (...a: unknown[]) => unknown).bind(gl);
    ctx[name] = (location: unknown, ...args: unknown[]) => {
      if (!(location instanceof Stand)) return orig(location, ...args);
      const h = held.get(location.program);
      if (h) {
        // the program is bound but not linked yet: kept (arrays copied: callers reuse theirs)
        h.queue.push([
          orig,
          location,
          args.map((a) => (ArrayBuffer.isView(a) ? (a as Float32Array).slice() : Array.isArray(a) ? [...a] : a)),
        ]);
        return;
      }
      return orig(locationOf(location), ...args);
    };
  }
}
