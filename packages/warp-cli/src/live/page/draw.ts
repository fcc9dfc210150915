/**
 * WebGL 2 drawing of a warp mesh: each grid cell as two triangles at its projector pixels, textured with
 * the dome master at the vertices' (u, v), times brightness and mask in linear light: the texture is
 * stored as SRGB8 so sampling decodes it (IEC 61966-2-1), the product is encoded again in the shader
 * (the canvas's framebuffer holds sRGB code values).
 */
import type { ImageBuffer, WarpMesh } from '@skyfold/warp-core';

const VERTEX = `#version 300 es
in vec2 position; // clip space
in vec2 uv;       // dome master, v down (the first row at v = 0)
in vec2 gain;     // brightness, mask
out vec2 vUv;
out vec2 vGain;
void main() {
  vUv = uv;
  vGain = gain;
  gl_Position = vec4(position, 0.0, 1.0);
}`;

const FRAGMENT = `#version 300 es
precision highp float;
uniform sampler2D map;
in vec2 vUv;
in vec2 vGain;
out vec4 colour;
// sRGB encoding, IEC 61966-2-1
vec3 encodeSrgb(vec3 c) {
  c = clamp(c, 0.0, 1.0);
  return mix(c * 12.92, 1.055 * pow(c, vec3(1.0 / 2.4)) - 0.055, step(vec3(0.0031308), c));
}
void main() {
  vec3 linear = texture(map, vUv).rgb * vGain.x * vGain.y;
  colour = vec4(encodeSrgb(linear), 1.0);
}`;

export interface Drawer {
  setMesh(mesh: WarpMesh): void;
  setTexture(image: ImageBuffer | TexImageSource): void;
  draw(): void;
  /** The drawn frame, RGBA, top row first. */
  read(): Uint8Array;
}

function compile(gl: WebGL2RenderingContext, type: number, source: string): WebGLShader {
  const s = gl.createShader(type)!;
  gl.shaderSource(s, source);
  gl.compileShader(s);
  if (!gl.getShaderParameter(s, gl.COMPILE_STATUS)) throw new Error(`shader: ${gl.getShaderInfoLog(s)}`);
  return s;
}

export function createDrawer(canvas: HTMLCanvasElement): Drawer {
  const gl = canvas.getContext('webgl2', { antialias: false, alpha: false, preserveDrawingBuffer: true });
  if (!gl) throw new Error('this browser gives no WebGL 2 context');
  const program = gl.createProgram()!;
  gl.attachShader(program, compile(gl, gl.VERTEX_SHADER, VERTEX));
  gl.attachShader(program, compile(gl, gl.FRAGMENT_SHADER, FRAGMENT));
  gl.linkProgram(program);
  if (!gl.getProgramParameter(program, gl.LINK_STATUS)) throw new Error(`program: ${gl.getProgramInfoLog(program)}`);
  const vao = gl.createVertexArray();
  gl.bindVertexArray(vao);
  const vertices = gl.createBuffer();
  const indices = gl.createBuffer();
  gl.bindBuffer(gl.ARRAY_BUFFER, vertices);
  const stride = 6 * 4;
  const attrib = (name: string, offset: number) => {
    const at = gl.getAttribLocation(program, name);
    gl.enableVertexAttribArray(at);
    gl.vertexAttribPointer(at, 2, gl.FLOAT, false, stride, offset);
  };
  attrib('position', 0);
  attrib('uv', 8);
  attrib('gain', 16);
  gl.bindBuffer(gl.ELEMENT_ARRAY_BUFFER, indices);
  const texture = gl.createTexture();
  gl.bindTexture(gl.TEXTURE_2D, texture);
  gl.texParameteri(gl.TEXTURE_2D, gl.TEXTURE_MIN_FILTER, gl.LINEAR);
  gl.texParameteri(gl.TEXTURE_2D, gl.TEXTURE_MAG_FILTER, gl.LINEAR);
  gl.texParameteri(gl.TEXTURE_2D, gl.TEXTURE_WRAP_S, gl.CLAMP_TO_EDGE);
  gl.texParameteri(gl.TEXTURE_2D, gl.TEXTURE_WRAP_T, gl.CLAMP_TO_EDGE);
  let count = 0;
  return {
    setMesh(mesh) {
      const { cols, rows } = mesh;
      const data = new Float32Array(cols * rows * 6);
      for (let r = 0; r < rows; r++)
        for (let c = 0; c < cols; c++) {
          const k = r * cols + c;
          data.set([(2 * c) / (cols - 1) - 1, 1 - (2 * r) / (rows - 1), mesh.u[k], mesh.v[k], mesh.brightness[k], mesh.mask[k]], k * 6);
        }
      const idx = new Uint32Array((cols - 1) * (rows - 1) * 6);
      let n = 0;
      for (let r = 0; r < rows - 1; r++)
        for (let c = 0; c < cols - 1; c++) {
          const a = r * cols + c;
          idx.set([a, a + cols, a + 1, a + 1, a + cols, a + cols + 1], n);
          n += 6;
        }
      gl.bindVertexArray(vao);
      gl.bindBuffer(gl.ARRAY_BUFFER, vertices);
      gl.bufferData(gl.ARRAY_BUFFER, data, gl.DYNAMIC_DRAW);
      gl.bindBuffer(gl.ELEMENT_ARRAY_BUFFER, indices);
      gl.bufferData(gl.ELEMENT_ARRAY_BUFFER, idx, gl.DYNAMIC_DRAW);
      count = n;
    },
    setTexture(image) {
      gl.bindTexture(gl.TEXTURE_2D, texture);
      gl.pixelStorei(gl.UNPACK_ALIGNMENT, 1);
      if ('data' in image && 'channels' in image) {
        if (image.channels !== 3) throw new Error('expected an RGB image');
        gl.texImage2D(gl.TEXTURE_2D, 0, gl.SRGB8, image.width, image.height, 0, gl.RGB, gl.UNSIGNED_BYTE, image.data as Uint8Array);
      } else {
        gl.texImage2D(gl.TEXTURE_2D, 0, gl.SRGB8_ALPHA8, gl.RGBA, gl.UNSIGNED_BYTE, image);
      }
    },
    draw() {
      gl.viewport(0, 0, canvas.width, canvas.height);
      gl.clearColor(0, 0, 0, 1);
      gl.clear(gl.COLOR_BUFFER_BIT);
      gl.useProgram(program);
      gl.bindVertexArray(vao);
      gl.activeTexture(gl.TEXTURE0);
      gl.bindTexture(gl.TEXTURE_2D, texture);
      gl.uniform1i(gl.getUniformLocation(program, 'map'), 0);
      gl.drawElements(gl.TRIANGLES, count, gl.UNSIGNED_INT, 0);
    },
    read() {
      const w = canvas.width;
      const h = canvas.height;
      const px = new Uint8Array(w * h * 4);
      gl.readPixels(0, 0, w, h, gl.RGBA, gl.UNSIGNED_BYTE, px);
      const out = new Uint8Array(px.length);
      for (let j = 0; j < h; j++) out.set(px.subarray((h - 1 - j) * w * 4, (h - j) * w * 4), j * w * 4);
      return out;
    },
  };
}
