// Lays a grid over a chart photo: drag the grid's four corners onto the outer corners of the
// swatch grid and the white area's corners onto blank card. Coordinates are sent in the
// photo's own pixels.
import { useEffect, useRef, useState } from "react";

type Pt = [number, number];

const CORNER_NAMES = ["top-left", "top-right", "bottom-right", "bottom-left"];
const ARROWS: Record<string, Pt> = { ArrowLeft: [-1, 0], ArrowRight: [1, 0], ArrowUp: [0, -1], ArrowDown: [0, 1] };
type Quad = [Pt, Pt, Pt, Pt];

function lerp(a: Pt, b: Pt, t: number): Pt {
  return [a[0] + (b[0] - a[0]) * t, a[1] + (b[1] - a[1]) * t];
}
/** Bilinear point of a quad (display only; the server uses the projective map). */
function at(q: Quad, u: number, v: number): Pt {
  return lerp(lerp(q[0], q[1], u), lerp(q[3], q[2], u), v);
}

export function GridOverlay({ src, width, height, rows, cols, initialGrid, initialWhite }: { src: string; width: number; height: number; rows: number; cols: number; initialGrid?: Quad; initialWhite?: Quad }) {
  const [grid, setGrid] = useState<Quad>(initialGrid ?? [[width * 0.1, height * 0.2], [width * 0.6, height * 0.2], [width * 0.6, height * 0.7], [width * 0.1, height * 0.7]]);
  const [white, setWhite] = useState<Quad>(initialWhite ?? [[width * 0.7, height * 0.3], [width * 0.85, height * 0.3], [width * 0.85, height * 0.6], [width * 0.7, height * 0.6]]);
  const [r, setR] = useState(rows);
  const [c, setC] = useState(cols);
  const svg = useRef<SVGSVGElement>(null);
  const drag = useRef<{ which: "grid" | "white"; i: number } | null>(null);
  const [hydrated, setHydrated] = useState(false);
  useEffect(() => setHydrated(true), []);

  const toPhoto = (e: React.PointerEvent): Pt => {
    const box = svg.current!.getBoundingClientRect();
    return [((e.clientX - box.left) / box.width) * width, ((e.clientY - box.top) / box.height) * height];
  };
  const onMove = (e: React.PointerEvent) => {
    if (!drag.current) return;
    const p = toPhoto(e);
    const { which, i } = drag.current;
    (which === "grid" ? setGrid : setWhite)((q) => q.map((v, j) => (j === i ? p : v)) as Quad);
  };
  const handle = (which: "grid" | "white", q: Quad) =>
    q.map((p, i) => (
      <circle
        key={`${which}-${i}`}
        data-testid={`${which}-corner-${i}`}
        cx={p[0]}
        cy={p[1]}
        r={Math.max(width, height) * 0.012}
        fill={which === "grid" ? "rgba(15,92,84,0.35)" : "rgba(200,120,0,0.35)"}
        stroke={which === "grid" ? "#0f5c54" : "#a05a00"}
        strokeWidth={Math.max(width, height) * 0.003}
        style={{ cursor: "grab", touchAction: "none" }}
        tabIndex={0}
        role="button"
        aria-roledescription="movable corner"
        aria-label={`${which === "grid" ? "Swatch grid" : "White area"} corner ${i + 1} (${CORNER_NAMES[i]}), at ${Math.round(p[0])}, ${Math.round(p[1])}. Arrow keys move it; hold Shift for bigger steps.`}
        onKeyDown={(e) => {
          const dir = ARROWS[e.key];
          if (!dir) return;
          e.preventDefault();
          const step = Math.max(1, Math.round(Math.max(width, height) / 400)) * (e.shiftKey ? 10 : 1);
          (which === "grid" ? setGrid : setWhite)((q) => q.map((v, j) => (j === i ? [Math.min(width, Math.max(0, v[0] + dir[0] * step)), Math.min(height, Math.max(0, v[1] + dir[1] * step))] : v)) as Quad);
        }}
        onPointerDown={(e) => {
          (e.target as Element).setPointerCapture?.(e.pointerId);
          drag.current = { which, i };
        }}
      />
    ));
  const sw = Math.max(width, height) * 0.002;
  const lines: [Pt, Pt][] = [];
  for (let k = 0; k <= r; k++) lines.push([at(grid, 0, k / r), at(grid, 1, k / r)]);
  for (let k = 0; k <= c; k++) lines.push([at(grid, k / c, 0), at(grid, k / c, 1)]);
  const off = [...grid, ...white].some(([x, y]) => x < 0 || y < 0 || x > width || y > height);
  return (
    <div className="space-y-2">
      <input type="hidden" name="grid" value={JSON.stringify({ corners: grid.map(([x, y]) => [Math.round(x * 10) / 10, Math.round(y * 10) / 10]), rows: r, cols: c })} />
      <input type="hidden" name="white" value={JSON.stringify(white.map(([x, y]) => [Math.round(x * 10) / 10, Math.round(y * 10) / 10]))} />
      <div className="flex gap-3">
        <label className="text-sm font-bold">Rows (pads) <input aria-label="Rows" type="number" min={1} max={20} value={r} onChange={(e) => setR(Math.max(1, Number(e.target.value) || 1))} className="ml-1 w-16 rounded border border-line px-2" /></label>
        <label className="text-sm font-bold">Columns (values) <input aria-label="Columns" type="number" min={2} max={20} value={c} onChange={(e) => setC(Math.max(2, Number(e.target.value) || 2))} className="ml-1 w-16 rounded border border-line px-2" /></label>
      </div>
      <div className="relative w-full select-none overflow-hidden rounded-xl border border-line bg-ink" data-testid="grid-photo">
        <img src={src} alt="The chart photo" className="block h-auto w-full" draggable={false} />
        <svg
          ref={svg}
          viewBox={`0 0 ${width} ${height}`}
          className="absolute inset-0 h-full w-full"
          style={{ touchAction: "none" }}
          data-ready={hydrated ? "yes" : "no"}
          onPointerMove={onMove}
          onPointerUp={() => (drag.current = null)}
          onPointerLeave={() => (drag.current = null)}
        >
          {lines.map(([a, b], k) => (
            <line key={k} x1={a[0]} y1={a[1]} x2={b[0]} y2={b[1]} stroke="#0f5c54" strokeWidth={sw} />
          ))}
          {[...Array(r)].flatMap((_, i) =>
            [...Array(c)].map((_, j) => {
              const p = at(grid, (j + 0.5) / c, (i + 0.5) / r);
              return <circle key={`d${i}-${j}`} cx={p[0]} cy={p[1]} r={sw * 2} fill="#ffffff" stroke="#0f5c54" strokeWidth={sw / 2} />;
            }),
          )}
          <polygon points={white.map((p) => p.join(",")).join(" ")} fill="rgba(255,200,80,0.15)" stroke="#a05a00" strokeWidth={sw} strokeDasharray={`${sw * 4} ${sw * 3}`} />
          {handle("grid", grid)}
          {handle("white", white)}
        </svg>
      </div>
      <p className="text-sm text-ink-soft">
        Drag the four green corners onto the outer corners of the swatch grid (top-left, top-right, bottom-right, bottom-left: first pad's first value at the top left). Drag the orange area onto blank white card: it is the light reference. With a keyboard, Tab to a corner and move it with the arrow keys (Shift for bigger steps).
      </p>
      {off && <p role="alert" className="text-sm font-bold text-alert">A corner lies outside the photo. Drag it back onto the photo.</p>}
    </div>
  );
}
