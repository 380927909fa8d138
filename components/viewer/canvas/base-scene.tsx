'use client';

import { Canvas, useThree } from '@react-three/fiber';
import { useEffect, useMemo, useRef } from 'react';
import { BufferGeometry, Float32BufferAttribute, Line, LineBasicMaterial, LineDashedMaterial, PerspectiveCamera, Vector3 } from 'three';
import { OrbitControls } from 'three/examples/jsm/controls/OrbitControls.js';
import { baseExtentMm, heightRangeUm, heightRgb, surfaceHeightUm, type BaseShape } from '../surface';
import { disposeLabel, makeLabel, type LabelStyle } from './label';

export type SceneScrew = { id: string; label: string; kind: 'corner' | 'middle' | 'outrigger'; xMm: number; yMm: number };
/** A move drawn on its screw: the one pending, or the last answered done in this stage. */
export type SceneMove = { screwId: string; turns: number; status: 'pending' | 'done' };
export type SceneProps = {
  screws: SceneScrew[];
  table: { lengthMm: number; widthMm: number };
  travelMm: number;
  /** The base model's shape, µrad; null before any reading (drawn flat). */
  shape: BaseShape | null;
  exaggeration: number;
  /** Where the last level reading was taken: on the table's centre line at a Y station, mm. */
  level: { axis: 'x' | 'y'; positionMm: number } | null;
  sweep: { diameterMm: number; label: string } | null;
  moves: SceneMove[];
  /** Bumped by the "reset view" button. */
  resetKey: number;
};

const MM = 0.001; // scene units are metres; machine +y (toward the back) is drawn along -z
const THICK_M = 0.12;
const FLOOR_M = -0.5;

type Frame = { shape: BaseShape | null; travelMm: number; exaggeration: number };
/** Scene height (m) of the base's top at (x, y) mm. */
const topM = (f: Frame, xMm: number, yMm: number) => (f.shape ? surfaceHeightUm(f.shape, f.travelMm, xMm, yMm) * 1e-6 * f.exaggeration : 0);
const at = (f: Frame, xMm: number, yMm: number, liftM = 0) => new Vector3(xMm * MM, topM(f, xMm, yMm) + liftM, -yMm * MM);

/** Where the camera looks from, as a direction: in front of the operator's side, a little to the right, from above. */
const VIEW_FROM = new Vector3(0.75, 1.8, 3.3).normalize();
const LOOK_AT = new Vector3(0, -0.12, 0);

/** Orbit by drag; the camera is placed so the whole base fits the canvas, and "reset view" returns there. */
function Controls({ resetKey, radiusM }: { resetKey: number; radiusM: number }) {
  const { camera, gl, invalidate, size } = useThree();
  const ref = useRef<OrbitControls | null>(null);
  useEffect(() => {
    const controls = new OrbitControls(camera, gl.domElement);
    controls.enableDamping = false;
    controls.maxPolarAngle = Math.PI / 2.05;
    controls.minDistance = 0.8;
    controls.maxDistance = 15;
    // Drawn on demand: only when the model changes or the view is turned.
    controls.addEventListener('change', () => invalidate());
    ref.current = controls;
    return () => controls.dispose();
  }, [camera, gl, invalidate]);
  useEffect(() => {
    const controls = ref.current;
    if (!controls || !(camera instanceof PerspectiveCamera)) return;
    const v = (camera.fov * Math.PI) / 180;
    const h = 2 * Math.atan(Math.tan(v / 2) * (size.width / Math.max(1, size.height)));
    camera.position.copy(VIEW_FROM).multiplyScalar(radiusM / Math.sin(Math.min(v, h) / 2)).add(LOOK_AT);
    controls.target.copy(LOOK_AT);
    controls.update();
    controls.saveState();
    invalidate();
  }, [camera, invalidate, radiusM, size.width, size.height]);
  useEffect(() => {
    if (resetKey > 0) ref.current?.reset();
  }, [resetKey]);
  return null;
}

/** The base: a slab whose top is the model's surface, coloured by height; its sides drop to a flat underside. */
function Slab({ frame, halfX, halfY }: { frame: Frame; halfX: number; halfY: number }) {
  const geometry = useMemo(() => {
    const nx = 36;
    const ny = 24;
    const range = heightRangeUm(frame.shape, frame.travelMm, halfX, halfY);
    const peak = Math.max(Math.abs(range.minUm), Math.abs(range.maxUm)) || 1;
    const pos: number[] = [];
    const col: number[] = [];
    const idx: number[] = [];
    const push = (v: Vector3, rgb: [number, number, number]) => {
      pos.push(v.x, v.y, v.z);
      col.push(...rgb);
      return pos.length / 3 - 1;
    };
    const xAt = (i: number) => -halfX + (2 * halfX * i) / nx;
    const yAt = (j: number) => -halfY + (2 * halfY * j) / ny;
    const grid: number[][] = [];
    for (let j = 0; j <= ny; j++) {
      grid[j] = [];
      for (let i = 0; i <= nx; i++) {
        const h = frame.shape ? surfaceHeightUm(frame.shape, frame.travelMm, xAt(i), yAt(j)) : 0;
        grid[j]![i] = push(at(frame, xAt(i), yAt(j)), heightRgb(h / peak));
      }
    }
    for (let j = 0; j < ny; j++) {
      for (let i = 0; i < nx; i++) {
        const a = grid[j]![i]!;
        const b = grid[j]![i + 1]!;
        const c = grid[j + 1]![i]!;
        const d = grid[j + 1]![i + 1]!;
        // y grows toward -z, so this winding faces up.
        idx.push(a, b, c, b, d, c);
      }
    }
    // Sides: the perimeter of the top, dropped by the slab's thickness below each edge point.
    const side: [number, number][] = [
      ...Array.from({ length: nx + 1 }, (_, i) => [xAt(i), -halfY] as [number, number]),
      ...Array.from({ length: ny }, (_, j) => [halfX, yAt(j + 1)] as [number, number]),
      ...Array.from({ length: nx }, (_, i) => [xAt(nx - 1 - i), halfY] as [number, number]),
      ...Array.from({ length: ny }, (_, j) => [-halfX, yAt(ny - 1 - j)] as [number, number]),
    ];
    const steel: [number, number, number] = [0.36, 0.4, 0.45];
    for (let k = 0; k < side.length - 1; k++) {
      const [x0, y0] = side[k]!;
      const [x1, y1] = side[k + 1]!;
      const t0 = push(at(frame, x0, y0), steel);
      const t1 = push(at(frame, x1, y1), steel);
      const b0 = push(new Vector3(x0 * MM, -THICK_M, -y0 * MM), steel);
      const b1 = push(new Vector3(x1 * MM, -THICK_M, -y1 * MM), steel);
      idx.push(t0, b0, t1, t1, b0, b1);
    }
    const g = new BufferGeometry();
    g.setAttribute('position', new Float32BufferAttribute(pos, 3));
    g.setAttribute('color', new Float32BufferAttribute(col, 3));
    g.setIndex(idx);
    g.computeVertexNormals();
    return g;
  }, [frame, halfX, halfY]);
  useEffect(() => () => geometry.dispose(), [geometry]);
  return (
    <mesh geometry={geometry}>
      <meshStandardMaterial vertexColors metalness={0.1} roughness={0.75} side={2} />
    </mesh>
  );
}

/** A line through points (already in scene coordinates), solid or dashed. */
function Polyline({ points, color, dashed = false, width = 1, closed = false }: { points: Vector3[]; color: string; dashed?: boolean; width?: number; closed?: boolean }) {
  const line = useMemo(() => {
    const g = new BufferGeometry().setFromPoints(closed ? [...points, points[0]!] : points);
    const m = dashed ? new LineDashedMaterial({ color, dashSize: 0.04, gapSize: 0.03, linewidth: width }) : new LineBasicMaterial({ color, linewidth: width });
    const l = new Line(g, m);
    if (dashed) l.computeLineDistances();
    return l;
  }, [points, color, dashed, width, closed]);
  useEffect(
    () => () => {
      line.geometry.dispose();
      (line.material as LineBasicMaterial).dispose();
    },
    [line],
  );
  return <primitive object={line} />;
}

/** A label; `align` says which way it runs from its point ('left': it ends there, 'right': it starts there). */
function Label({ text, position, heightM = 0.07, style, align = 'centre' }: { text: string; position: Vector3; heightM?: number; style?: LabelStyle; align?: 'left' | 'centre' | 'right' }) {
  const key = JSON.stringify(style ?? {});
  const sprite = useMemo(() => {
    const label = makeLabel(text, heightM, style);
    label.center.set(align === 'left' ? 1 : align === 'right' ? 0 : 0.5, 0.5);
    return label;
    // `key` stands for `style`, which callers write inline.
  }, [text, heightM, key, align]);
  useEffect(() => () => disposeLabel(sprite), [sprite]);
  return <primitive object={sprite} position={position} />;
}

/** A band on the surface along a circle about the table centre (a line would be one pixel wide in WebGL). */
function SurfaceRing({ frame, radiusMm, widthMm, color }: { frame: Frame; radiusMm: number; widthMm: number; color: string }) {
  const geometry = useMemo(() => {
    const n = 96;
    const pos: number[] = [];
    const idx: number[] = [];
    for (let i = 0; i <= n; i++) {
      const a = (i / n) * 2 * Math.PI;
      for (const r of [radiusMm - widthMm / 2, radiusMm + widthMm / 2]) {
        const v = at(frame, r * Math.cos(a), r * Math.sin(a), 0.004);
        pos.push(v.x, v.y, v.z);
      }
      if (i < n) idx.push(2 * i, 2 * i + 1, 2 * i + 2, 2 * i + 1, 2 * i + 3, 2 * i + 2);
    }
    const g = new BufferGeometry();
    g.setAttribute('position', new Float32BufferAttribute(pos, 3));
    g.setIndex(idx);
    return g;
  }, [frame, radiusMm, widthMm]);
  useEffect(() => () => geometry.dispose(), [geometry]);
  return (
    <mesh geometry={geometry}>
      <meshBasicMaterial color={color} side={2} />
    </mesh>
  );
}

/** A rectangle on the surface (follows its shape), mm half-sizes. */
function surfaceRect(frame: Frame, hx: number, hy: number, liftM: number): Vector3[] {
  const n = 24;
  const pts: Vector3[] = [];
  for (let i = 0; i < n; i++) pts.push(at(frame, -hx + (2 * hx * i) / n, -hy, liftM));
  for (let i = 0; i < n; i++) pts.push(at(frame, hx, -hy + (2 * hy * i) / n, liftM));
  for (let i = 0; i < n; i++) pts.push(at(frame, hx - (2 * hx * i) / n, hy, liftM));
  for (let i = 0; i < n; i++) pts.push(at(frame, -hx, hy - (2 * hy * i) / n, liftM));
  return pts;
}

const KIND_COLOUR: Record<SceneScrew['kind'], string> = { corner: '#d38b0c', middle: '#4a6fa5', outrigger: '#7a7f86' };

function ScrewPost({ screw, frame, move }: { screw: SceneScrew; frame: Frame; move: SceneMove | undefined }) {
  const top = topM(frame, screw.xMm, screw.yMm) - THICK_M;
  const length = Math.max(0.02, top - FLOOR_M);
  const surface = at(frame, screw.xMm, screw.yMm);
  const turns = move ? `${move.turns > 0 ? '+' : '−'}${Math.abs(move.turns).toFixed(3)} turn` : '';
  const text = move ? (move.status === 'pending' ? `${screw.label}  ${move.turns > 0 ? '▲ raise' : '▼ lower'} ${turns}` : `${screw.label}  ✓ ${turns}`) : screw.label;
  const style: LabelStyle = !move
    ? { background: 'rgba(255,255,255,0.9)', border: '#14171b', color: '#14171b' }
    : move.status === 'pending'
      ? { background: '#f2a516', border: '#14171b', color: '#14171b' }
      : { background: '#1b7a3d', color: '#ffffff' };
  const up = (move?.turns ?? 0) > 0;
  return (
    <group>
      <mesh position={[screw.xMm * MM, FLOOR_M + length / 2, -screw.yMm * MM]}>
        <cylinderGeometry args={[0.028, 0.028, length, 20]} />
        <meshStandardMaterial color={move?.status === 'pending' ? '#f2a516' : KIND_COLOUR[screw.kind]} metalness={0.5} roughness={0.4} />
      </mesh>
      {/* The pad under the screw. */}
      <mesh position={[screw.xMm * MM, FLOOR_M + 0.01, -screw.yMm * MM]}>
        <cylinderGeometry args={[0.07, 0.08, 0.02, 24]} />
        <meshStandardMaterial color="#3a3f45" />
      </mesh>
      {/* Where the screw meets the top: a disc on the surface. */}
      <mesh position={[surface.x, surface.y + 0.002, surface.z]}>
        <cylinderGeometry args={[0.035, 0.035, 0.004, 24]} />
        <meshStandardMaterial color={move?.status === 'pending' ? '#f2a516' : '#14171b'} />
      </mesh>
      {move?.status === 'pending' && (
        <mesh position={[surface.x, surface.y + 0.13, surface.z]} rotation={[up ? 0 : Math.PI, 0, 0]}>
          <coneGeometry args={[0.05, 0.12, 20]} />
          <meshStandardMaterial color="#f2a516" emissive="#7a4f00" />
        </mesh>
      )}
      <Label text={text} position={new Vector3(surface.x, surface.y + (move?.status === 'pending' ? 0.32 : 0.15), surface.z)} heightM={move ? 0.15 : 0.12} style={style} align={move ? (screw.xMm < 0 ? 'right' : 'left') : 'centre'} />
    </group>
  );
}

/** The tilt view: the base model's surface, exaggerated, over its screws, with the level and the sweep circle. */
export function BaseScene(p: SceneProps) {
  const { halfX, halfY } = baseExtentMm(p.screws, p.table);
  const frame = useMemo<Frame>(() => ({ shape: p.shape, travelMm: p.travelMm, exaggeration: p.exaggeration }), [p.shape, p.travelMm, p.exaggeration]);
  const span = Math.max(halfX, halfY) * MM;
  const edge = useMemo(() => surfaceRect(frame, halfX, halfY, 0.002), [frame, halfX, halfY]);
  const tableOutline = useMemo(() => surfaceRect(frame, p.table.lengthMm / 2, p.table.widthMm / 2, 0.003), [frame, p.table.lengthMm, p.table.widthMm]);
  const reference = useMemo(
    () => [new Vector3(-halfX * MM, 0, halfY * MM), new Vector3(halfX * MM, 0, halfY * MM), new Vector3(halfX * MM, 0, -halfY * MM), new Vector3(-halfX * MM, 0, -halfY * MM)],
    [halfX, halfY],
  );
  const corners = useMemo(
    () =>
      [
        [-halfX, -halfY],
        [halfX, -halfY],
        [halfX, halfY],
        [-halfX, halfY],
      ].map(([x, y]) => [new Vector3(x! * MM, 0, -y! * MM), at(frame, x!, y!)]),
    [frame, halfX, halfY],
  );
  // Cross-sections at the level's stations (front, middle, back of the Y travel): a cross-slope that differs from one to
  // the next is the twist.
  const sections = useMemo(
    () =>
      [
        { name: 'front', yMm: -p.travelMm / 2 },
        { name: 'middle', yMm: 0 },
        { name: 'back', yMm: p.travelMm / 2 },
      ].map(({ name, yMm }) => {
        const mid = at(frame, 0, yMm, 0.003);
        return {
          name,
          surface: Array.from({ length: 25 }, (_, i) => at(frame, -halfX + (2 * halfX * i) / 24, yMm, 0.003)),
          labelAt: new Vector3((-halfX - 170) * MM, mid.y, mid.z),
        };
      }),
    [frame, halfX, p.travelMm],
  );
  const levelPos = p.level ? at(frame, 0, p.level.positionMm, 0.025) : null;
  const moveOf = new Map(p.moves.map((m) => [m.screwId, m]));
  return (
    <Canvas frameloop="demand" camera={{ position: [span * 0.75, span * 1.8, span * 3.3], fov: 36, near: 0.05, far: 100 }} dpr={[1, 2]} data-testid="tilt-canvas">
      <color attach="background" args={['#e9e6dc']} />
      <ambientLight intensity={1.1} />
      <directionalLight position={[1.5, 4, 2.5]} intensity={1.5} />
      <directionalLight position={[-2, 2, -1]} intensity={0.4} />
      <Controls resetKey={p.resetKey} radiusM={Math.hypot(halfX, halfY) * MM * 0.95 + 0.2} />
      <gridHelper args={[span * 5, 25, '#b9b3a3', '#d3cec0']} position={[0, FLOOR_M, 0]} />
      <Slab frame={frame} halfX={halfX} halfY={halfY} />
      {/* Where a level base would lie: the dashed outline at the centre's height, and drop lines from each corner. */}
      <Polyline points={reference} color="#14171b" dashed closed />
      {corners.map(([a, b], i) => (
        <Polyline key={i} points={[a!, b!]} color="#14171b" dashed />
      ))}
      <Polyline points={edge} color="#14171b" closed />
      <Polyline points={tableOutline} color="#4a525c" closed />
      {sections.map((sec) => (
        <group key={sec.name}>
          <Polyline points={sec.surface} color="#0f5d4e" />
          <Label text={sec.name} position={sec.labelAt} align="left" heightM={0.09} style={{ color: '#0a4237', background: 'rgba(255,255,255,0.75)' }} />
        </group>
      ))}
      {p.sweep && <SurfaceRing frame={frame} radiusMm={p.sweep.diameterMm / 2} widthMm={14} color="#0f5d4e" />}
      {p.sweep && <Label text={p.sweep.label} position={at(frame, 0, -p.sweep.diameterMm / 2 - 60, 0.06)} heightM={0.08} style={{ color: '#0a4237', background: 'rgba(255,255,255,0.85)' }} />}
      {p.screws.map((s) => (
        <ScrewPost key={s.id} screw={s} frame={frame} move={moveOf.get(s.id)} />
      ))}
      {levelPos && p.level && (
        <group position={levelPos} rotation={[0, p.level.axis === 'x' ? 0 : Math.PI / 2, 0]}>
          <mesh>
            <boxGeometry args={[0.3, 0.045, 0.06]} />
            <meshStandardMaterial color="#c6e23a" emissive="#3b4a00" />
          </mesh>
          <mesh position={[0, 0.02, 0]}>
            <boxGeometry args={[0.07, 0.01, 0.03]} />
            <meshStandardMaterial color="#0f5d4e" />
          </mesh>
        </group>
      )}
      {levelPos && p.level && (
        <Label text={`level · ${p.level.axis === 'x' ? 'across' : 'along'}`} position={levelPos.clone().add(new Vector3(0, 0.11, 0))} heightM={0.08} style={{ background: '#c6e23a', color: '#14171b', border: '#14171b' }} />
      )}
      <Label text="FRONT · operator side" position={new Vector3(0, -THICK_M, (halfY + 200) * MM)} heightM={0.11} style={{ background: '#14171b', color: '#ffffff' }} />
      <Label text="BACK" position={new Vector3(-halfX * 0.6 * MM, -THICK_M, -(halfY + 160) * MM)} heightM={0.1} style={{ color: '#14171b', background: 'rgba(255,255,255,0.7)' }} />
      <Label text="+X →" position={new Vector3((halfX + 220) * MM, -THICK_M, 0)} heightM={0.1} style={{ color: '#14171b', background: 'rgba(255,255,255,0.7)' }} />
    </Canvas>
  );
}
