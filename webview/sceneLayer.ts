// Draws a GraphScene inside sigma's frame as one custom layer: every link in one gl.LINES draw
// over an index buffer, every node in one gl.POINTS draw (neighbours, then members on top), with
// sigma's camera matrix. sigma's own programs draw each node and link as an instance of a quad;
// where WebGL runs in software (SwiftShader: VS Code on remote desktops, VMs, machines without a
// usable GPU) every instance costs tens of microseconds, in the screen and the picking pass alike,
// so a neighbourhood of 10,000 nodes and 20,000 links took one to two seconds per frame. Here a
// frame is two draw calls whose cost is the pixels they cover. Hover and click are resolved on the
// CPU (graphScene.ts pickNode), so no picking pass is drawn. Links still cost per pixel in software
// (20,000 of them about 160 ms a frame there), so with sigma's hideEdgesOnMove they wait while the
// view moves.
import type Sigma from 'sigma';
import type { RenderParams } from 'sigma/types';
import { nodeCount, type GraphScene } from './graphScene';

/** What the layer draws; bump a version after changing the arrays in place. */
export interface SceneSource {
  scene: GraphScene | null;
  positionsVersion: number;
  coloursVersion: number;
  /** Premultiplied-alpha RGBA in 0…1. */
  linkColour: [number, number, number, number];
}

export interface ViewScales {
  /** Screen (CSS) pixels of node radius per unit of node size. */
  pixelsPerSize: number;
  /** Normalised coordinate = offset + graph coordinate × scale (sigma's normalisation). */
  offsetX: number;
  offsetY: number;
  scale: number;
}

/** The same sizing sigma's node programs use (radius in pixels from size, zoom and the camera matrix). */
export function viewScales(renderer: Sigma, params: RenderParams): ViewScales {
  const m = params.matrix;
  const matrixScaleX = Math.hypot(m[0], m[3]);
  const normalise = renderer.getNormalizationFunction();
  const origin = normalise({ x: 0, y: 0 });
  return {
    pixelsPerSize: (params.correctionRatio / params.sizeRatio) * matrixScaleX * params.width,
    offsetX: origin.x,
    offsetY: origin.y,
    scale: 1 / normalise.ratio,
  };
}

/** sigma's own test for "the view is moving" (its hideEdgesOnMove setting; sigma redraws once the motion ends). */
function viewMoving(renderer: Sigma): boolean {
  const captor = renderer.getMouseCaptor();
  return renderer.getCamera().isAnimating() || captor.isMoving || captor.draggedEvents > 0 || captor.currentWheelDirection !== 0;
}

const vertexHeader = `#version 300 es
uniform mat3 u_matrix;
uniform vec3 u_normalise;
in vec2 a_position;
vec4 clipPosition() {
  vec2 normalised = u_normalise.xy + a_position * u_normalise.z;
  return vec4((u_matrix * vec3(normalised, 1.0)).xy, 0.0, 1.0);
}
`;

const linkVertex = `${vertexHeader}
void main() { gl_Position = clipPosition(); }
`;

const linkFragment = `#version 300 es
precision mediump float;
uniform vec4 u_colour;
out vec4 fragColour;
void main() { fragColour = u_colour; }
`;

const nodeVertex = `${vertexHeader}
uniform float u_pointScale;
uniform float u_maxPointSize;
in float a_size;
in vec4 a_colour;
out vec4 v_colour;
out float v_diameter;
void main() {
  gl_Position = clipPosition();
  v_diameter = min(a_size * u_pointScale + 1.0, u_maxPointSize);
  gl_PointSize = v_diameter;
  v_colour = a_colour;
}
`;

// A disc with a one-pixel soft edge, premultiplied for sigma's blend (ONE, ONE_MINUS_SRC_ALPHA).
const nodeFragment = `#version 300 es
precision mediump float;
in vec4 v_colour;
in float v_diameter;
out vec4 fragColour;
void main() {
  float fromEdge = v_diameter * 0.5 * (1.0 - length(gl_PointCoord * 2.0 - 1.0));
  float alpha = clamp(fromEdge, 0.0, 1.0) * v_colour.a;
  if (alpha <= 0.0) discard;
  fragColour = vec4(v_colour.rgb * alpha, alpha);
}
`;

function compile(gl: WebGL2RenderingContext, vertexSource: string, fragmentSource: string): WebGLProgram {
  const program = gl.createProgram();
  const shaders = [
    [gl.VERTEX_SHADER, vertexSource],
    [gl.FRAGMENT_SHADER, fragmentSource],
  ] as const;
  for (const [type, source] of shaders) {
    const shader = gl.createShader(type);
    if (!shader) throw new Error('WebGL could not create a shader');
    gl.shaderSource(shader, source);
    gl.compileShader(shader);
    if (!gl.getShaderParameter(shader, gl.COMPILE_STATUS)) throw new Error(`graph shader: ${gl.getShaderInfoLog(shader)}`);
    gl.attachShader(program, shader);
    gl.deleteShader(shader);
  }
  gl.linkProgram(program);
  if (!gl.getProgramParameter(program, gl.LINK_STATUS)) throw new Error(`graph program: ${gl.getProgramInfoLog(program)}`);
  return program;
}

/** A program for sigma's addCustomLayerProgram; sigma calls the factory again after a lost context. */
export class SceneLayer {
  private readonly linkProgram: WebGLProgram;
  private readonly nodeProgram: WebGLProgram;
  private readonly linkVao: WebGLVertexArrayObject;
  private readonly nodeVao: WebGLVertexArrayObject;
  private readonly positionBuffer: WebGLBuffer;
  private readonly sizeBuffer: WebGLBuffer;
  private readonly colourBuffer: WebGLBuffer;
  private readonly linkBuffer: WebGLBuffer;
  private uploadedScene: GraphScene | null = null;
  private uploadedPositions = -1;
  private uploadedColours = -1;
  /** The largest point this GPU draws: the standard promises only 1 px, GPUs commonly give 255 to 1,024 (from memory). */
  private readonly maxPointSize: number;
  /** Uniform locations, looked up once per program rather than every frame. */
  private readonly linkUniforms: Record<'u_matrix' | 'u_normalise' | 'u_colour', WebGLUniformLocation | null>;
  private readonly nodeUniforms: Record<'u_matrix' | 'u_normalise' | 'u_pointScale' | 'u_maxPointSize', WebGLUniformLocation | null>;

  constructor(
    private readonly gl: WebGL2RenderingContext,
    private readonly renderer: Sigma,
    private readonly source: SceneSource,
  ) {
    this.maxPointSize = (gl.getParameter(gl.ALIASED_POINT_SIZE_RANGE) as Float32Array | null)?.[1] ?? 64;
    this.linkProgram = compile(gl, linkVertex, linkFragment);
    this.nodeProgram = compile(gl, nodeVertex, nodeFragment);
    const locate = <K extends string>(program: WebGLProgram, names: K[]) =>
      Object.fromEntries(names.map((name) => [name, gl.getUniformLocation(program, name)])) as Record<K, WebGLUniformLocation | null>;
    this.linkUniforms = locate(this.linkProgram, ['u_matrix', 'u_normalise', 'u_colour']);
    this.nodeUniforms = locate(this.nodeProgram, ['u_matrix', 'u_normalise', 'u_pointScale', 'u_maxPointSize']);
    this.positionBuffer = gl.createBuffer();
    this.sizeBuffer = gl.createBuffer();
    this.colourBuffer = gl.createBuffer();
    this.linkBuffer = gl.createBuffer();
    this.linkVao = gl.createVertexArray();
    this.nodeVao = gl.createVertexArray();
    this.bindAttribute(this.linkVao, this.linkProgram, 'a_position', this.positionBuffer, 2, gl.FLOAT, false);
    gl.bindVertexArray(this.linkVao);
    gl.bindBuffer(gl.ELEMENT_ARRAY_BUFFER, this.linkBuffer);
    gl.bindVertexArray(null);
    this.bindAttribute(this.nodeVao, this.nodeProgram, 'a_position', this.positionBuffer, 2, gl.FLOAT, false);
    this.bindAttribute(this.nodeVao, this.nodeProgram, 'a_size', this.sizeBuffer, 1, gl.FLOAT, false);
    this.bindAttribute(this.nodeVao, this.nodeProgram, 'a_colour', this.colourBuffer, 4, gl.UNSIGNED_BYTE, true);
  }

  private bindAttribute(
    vao: WebGLVertexArrayObject,
    program: WebGLProgram,
    name: string,
    buffer: WebGLBuffer,
    size: number,
    type: number,
    normalised: boolean,
  ): void {
    const gl = this.gl;
    const location = gl.getAttribLocation(program, name);
    gl.bindVertexArray(vao);
    gl.bindBuffer(gl.ARRAY_BUFFER, buffer);
    gl.enableVertexAttribArray(location);
    gl.vertexAttribPointer(location, size, type, normalised, 0, 0);
    gl.bindVertexArray(null);
    gl.bindBuffer(gl.ARRAY_BUFFER, null);
  }

  private upload(scene: GraphScene): void {
    const gl = this.gl;
    const fresh = scene !== this.uploadedScene;
    if (fresh || this.source.positionsVersion !== this.uploadedPositions) {
      gl.bindBuffer(gl.ARRAY_BUFFER, this.positionBuffer);
      gl.bufferData(gl.ARRAY_BUFFER, scene.positions, gl.DYNAMIC_DRAW);
      this.uploadedPositions = this.source.positionsVersion;
    }
    if (fresh || this.source.coloursVersion !== this.uploadedColours) {
      gl.bindBuffer(gl.ARRAY_BUFFER, this.colourBuffer);
      gl.bufferData(gl.ARRAY_BUFFER, scene.colours, gl.DYNAMIC_DRAW);
      this.uploadedColours = this.source.coloursVersion;
    }
    if (fresh) {
      gl.bindBuffer(gl.ARRAY_BUFFER, this.sizeBuffer);
      gl.bufferData(gl.ARRAY_BUFFER, scene.sizes, gl.STATIC_DRAW);
      // The element buffer belongs to the links' vertex array.
      gl.bindVertexArray(this.linkVao);
      gl.bufferData(gl.ELEMENT_ARRAY_BUFFER, scene.links, gl.STATIC_DRAW);
      gl.bindVertexArray(null);
      this.uploadedScene = scene;
    }
    gl.bindBuffer(gl.ARRAY_BUFFER, null);
  }

  render(params: RenderParams): void {
    const scene = this.source.scene;
    if (!scene || nodeCount(scene) === 0) return;
    const gl = this.gl;
    this.upload(scene);
    const scales = viewScales(this.renderer, params);
    gl.enable(gl.BLEND);
    gl.blendFunc(gl.ONE, gl.ONE_MINUS_SRC_ALPHA);
    gl.disable(gl.DEPTH_TEST);
    const setView = (program: WebGLProgram, uniforms: Record<'u_matrix' | 'u_normalise', WebGLUniformLocation | null>) => {
      gl.useProgram(program);
      gl.uniformMatrix3fv(uniforms.u_matrix, false, params.matrix);
      gl.uniform3f(uniforms.u_normalise, scales.offsetX, scales.offsetY, scales.scale);
    };
    if (scene.links.length > 0 && !(this.renderer.getSetting('hideEdgesOnMove') && viewMoving(this.renderer))) {
      setView(this.linkProgram, this.linkUniforms);
      gl.uniform4fv(this.linkUniforms.u_colour, this.source.linkColour);
      gl.bindVertexArray(this.linkVao);
      gl.drawElements(gl.LINES, scene.links.length, gl.UNSIGNED_INT, 0);
    }
    setView(this.nodeProgram, this.nodeUniforms);
    gl.uniform1f(this.nodeUniforms.u_pointScale, 2 * scales.pixelsPerSize * params.pixelRatio);
    gl.uniform1f(this.nodeUniforms.u_maxPointSize, this.maxPointSize);
    gl.bindVertexArray(this.nodeVao);
    const count = nodeCount(scene);
    if (count > scene.memberCount) gl.drawArrays(gl.POINTS, scene.memberCount, count - scene.memberCount);
    if (scene.memberCount > 0) gl.drawArrays(gl.POINTS, 0, Math.min(scene.memberCount, count));
    gl.bindVertexArray(null);
  }

  kill(): void {
    const gl = this.gl;
    gl.deleteVertexArray(this.linkVao);
    gl.deleteVertexArray(this.nodeVao);
    for (const buffer of [this.positionBuffer, this.sizeBuffer, this.colourBuffer, this.linkBuffer]) gl.deleteBuffer(buffer);
    gl.deleteProgram(this.linkProgram);
    gl.deleteProgram(this.nodeProgram);
  }
}
