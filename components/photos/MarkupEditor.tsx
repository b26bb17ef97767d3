/**
 * Draw on a photo: arrows, ellipses, rectangles, freehand lines and short labels in the palette of
 * shared/schemas/photoMarks.ts, with undo. A finger or a mouse drags a shape out (PanResponder works
 * for both on the web); the label tool places the typed words where the photo is pressed. Saved as
 * the whole list through the outbox with If-Match (the version the editor opened); the server draws
 * the flattened copy the photo's addresses then show. Coordinates are fractions of the image.
 */
import { useEffect, useMemo, useRef, useState } from 'react';
import { Image, Modal, PanResponder, Pressable, StyleSheet, View, type GestureResponderEvent, type LayoutChangeEvent } from 'react-native';
import Svg, { Ellipse, G, Line, Polyline, Rect, Text as SvgText } from 'react-native-svg';
import { MARK_COLOURS, MARK_PAINT, MARK_TEXT_LIMIT, MAX_FREEHAND_POINTS, MAX_MARKS, markSizes, type Mark, type MarkColour } from '../../shared/schemas/photoMarks';
import { ApiError } from '../api/client';
import { isQueued } from '../outbox';
import { savePhotoMarksWrite, usePhotoMarksQuery, useSavePhotoMarksMutation } from '../queries/photoMarks';
import { colors, radius, space, touchTarget } from '../theme';
import { AppText } from '../ui/AppText';
import { Button } from '../ui/Button';
import { TextField } from '../ui/TextField';

type Tool = Mark['kind'];
const TOOLS: Array<{ tool: Tool; words: string }> = [
  { tool: 'arrow', words: 'Arrow' },
  { tool: 'ellipse', words: 'Circle' },
  { tool: 'rect', words: 'Box' },
  { tool: 'freehand', words: 'Draw' },
  { tool: 'text', words: 'Label' },
];

const clamp = (n: number) => Math.min(1, Math.max(0, n));
const round = (n: number) => Math.round(n * 10000) / 10000;

/** The mark a drag from `a` to `b` makes (fractions of the image). */
function shapeOf(tool: Exclude<Tool, 'text' | 'freehand'>, colour: MarkColour, a: { x: number; y: number }, b: { x: number; y: number }): Mark {
  if (tool === 'arrow') return { kind: 'arrow', colour, from: a, to: b };
  if (tool === 'rect') return { kind: 'rect', colour, x: Math.min(a.x, b.x), y: Math.min(a.y, b.y), w: Math.abs(b.x - a.x), h: Math.abs(b.y - a.y) };
  const rx = Math.abs(b.x - a.x) / 2;
  const ry = Math.abs(b.y - a.y) / 2;
  return { kind: 'ellipse', colour, center: { x: round((a.x + b.x) / 2), y: round((a.y + b.y) / 2) }, rx: round(rx), ry: round(ry) };
}

/** One mark drawn at the displayed size: its outline, then its colour (as the server draws it). */
function MarkShape({ mark, width, height }: { mark: Mark; width: number; height: number }) {
  const { stroke, outline, font } = markSizes(width, height);
  const paint = MARK_PAINT[mark.colour];
  const layer = (c: string, w: number) => ({ stroke: c, strokeWidth: w, fill: 'none', strokeLinecap: 'round' as const, strokeLinejoin: 'round' as const });
  const draw = (c: string, w: number) => {
    const p = layer(c, w);
    switch (mark.kind) {
      case 'arrow': {
        const x1 = mark.from.x * width, y1 = mark.from.y * height, x2 = mark.to.x * width, y2 = mark.to.y * height;
        const a = Math.atan2(y2 - y1, x2 - x1);
        const head = stroke * 4;
        const wing = (s: number) => `${x2 - head * Math.cos(a + s * 0.5)},${y2 - head * Math.sin(a + s * 0.5)}`;
        return (
          <G>
            <Line x1={x1} y1={y1} x2={x2} y2={y2} {...p} />
            <Polyline points={`${wing(1)} ${x2},${y2} ${wing(-1)}`} {...p} />
          </G>
        );
      }
      case 'ellipse':
        return <Ellipse cx={mark.center.x * width} cy={mark.center.y * height} rx={mark.rx * width} ry={mark.ry * height} {...p} />;
      case 'rect':
        return <Rect x={mark.x * width} y={mark.y * height} width={mark.w * width} height={mark.h * height} {...p} />;
      case 'freehand':
        return <Polyline points={mark.points.map((q) => `${q.x * width},${q.y * height}`).join(' ')} {...p} />;
      case 'text':
        return null;
    }
  };
  if (mark.kind === 'text') {
    // The outline first, then the letters over it (paint-order, which the server's SVG uses, is not
    // offered by every renderer).
    const common = { x: mark.at.x * width, y: mark.at.y * height + font * 0.8, fontSize: font, fontWeight: 'bold' as const, fontFamily: 'DejaVu Sans, Arial, Helvetica, sans-serif' };
    return (
      <G>
        <SvgText {...common} fill={paint.outline} stroke={paint.outline} strokeWidth={font * 0.16} strokeLinejoin="round">
          {mark.text}
        </SvgText>
        <SvgText {...common} fill={paint.fill}>
          {mark.text}
        </SvgText>
      </G>
    );
  }
  return (
    <G>
      {draw(paint.outline, stroke + 2 * outline)}
      {draw(paint.fill, stroke)}
    </G>
  );
}

export interface MarkupPhoto {
  id: string;
  /** The photo as taken (`?original=1`): marks are drawn over the original, never over a flattened copy. */
  originalUri: string;
  width: number;
  height: number;
  label: string;
}

export function MarkupEditor({ photo, onClose, testID = 'markup' }: { photo: MarkupPhoto; onClose: (saved: boolean) => void; testID?: string }) {
  const query = usePhotoMarksQuery(photo.id);
  const save = useSavePhotoMarksMutation(photo.id, `Marks on ${photo.label}`);
  const [marks, setMarks] = useState<Mark[]>([]);
  const [version, setVersion] = useState(0);
  const [tool, setTool] = useState<Tool>('arrow');
  const [colour, setColour] = useState<MarkColour>('red');
  const [label, setLabel] = useState('');
  const [draft, setDraft] = useState<Mark | null>(null);
  const [box, setBox] = useState({ width: 0, height: 0 });
  const [message, setMessage] = useState<string | null>(null);

  useEffect(() => {
    if (query.data) {
      setMarks(query.data.marks);
      setVersion(query.data.version);
    }
  }, [query.data]);

  // The latest values for the responder, which is made once.
  const live = useRef({ tool, colour, label, box, marks });
  live.current = { tool, colour, label, box, marks };
  const start = useRef<{ x: number; y: number } | null>(null);
  const drawn = useRef<Mark | null>(null);

  const at = (e: GestureResponderEvent) => {
    const { width, height } = live.current.box;
    return { x: round(clamp(e.nativeEvent.locationX / width)), y: round(clamp(e.nativeEvent.locationY / height)) };
  };

  const responder = useMemo(
    () =>
      PanResponder.create({
        onStartShouldSetPanResponder: () => true,
        onMoveShouldSetPanResponder: () => true,
        onPanResponderGrant: (e) => {
          const p = at(e);
          start.current = p;
          const { tool: t, colour: c, label: words } = live.current;
          if (t === 'text') {
            const text = words.trim();
            drawn.current = text && text.length <= MARK_TEXT_LIMIT.max ? { kind: 'text', colour: c, at: p, text } : null;
          } else if (t === 'freehand') {
            drawn.current = { kind: 'freehand', colour: c, points: [p] };
          } else {
            drawn.current = shapeOf(t, c, p, p);
          }
          setDraft(drawn.current);
        },
        onPanResponderMove: (e) => {
          const a = start.current;
          const d = drawn.current;
          if (!a || !d) return;
          const p = at(e);
          if (d.kind === 'freehand') {
            if (d.points.length < MAX_FREEHAND_POINTS) drawn.current = { ...d, points: [...d.points, p] };
          } else if (d.kind === 'text') {
            drawn.current = { ...d, at: p };
          } else {
            drawn.current = shapeOf(d.kind, d.colour, a, p);
          }
          setDraft(drawn.current);
        },
        onPanResponderRelease: () => {
          const d = drawn.current;
          drawn.current = null;
          start.current = null;
          setDraft(null);
          if (!d) return;
          // A tap with a shape tool is no mark (a line of one point, a box of no size).
          if (d.kind === 'freehand' && d.points.length < 2) return;
          if (d.kind === 'rect' && (d.w < 0.01 || d.h < 0.01)) return;
          if (d.kind === 'ellipse' && (d.rx < 0.005 || d.ry < 0.005)) return;
          if (d.kind === 'arrow' && Math.hypot(d.to.x - d.from.x, d.to.y - d.from.y) < 0.02) return;
          if (live.current.marks.length >= MAX_MARKS) return;
          setMarks((m) => [...m, d]);
        },
        onPanResponderTerminate: () => {
          drawn.current = null;
          setDraft(null);
        },
      }),
    [],
  );

  const onLayout = (e: LayoutChangeEvent) => {
    const { width, height } = e.nativeEvent.layout;
    // The photo fits inside the space, keeping its shape.
    const scale = Math.min(width / photo.width, height / photo.height);
    setBox({ width: Math.floor(photo.width * scale), height: Math.floor(photo.height * scale) });
  };

  const onSave = async () => {
    setMessage(null);
    try {
      const result = await save.mutateAsync(savePhotoMarksWrite(photo.id, marks, version));
      if (!isQueued(result)) setVersion(result.version);
      onClose(true);
    } catch (err) {
      if (err instanceof ApiError && err.status === 412) {
        setMessage('Someone else changed the marks on this photo meanwhile. Close and open it again to see theirs.');
      } else {
        setMessage(err instanceof ApiError ? err.message : 'The marks could not be saved. Try again.');
      }
    }
  };

  const full = marks.length >= MAX_MARKS;
  return (
    <Modal visible transparent animationType="none" onRequestClose={() => onClose(false)}>
      <View style={styles.backdrop} testID={testID}>
        <AppText variant="title" role="heading" style={styles.light}>
          Mark up {photo.label}
        </AppText>
        <View style={styles.stage} onLayout={onLayout}>
          {box.width > 0 ? (
            <View style={{ width: box.width, height: box.height }} {...responder.panHandlers} testID={`${testID}-canvas`}>
              <Image source={{ uri: photo.originalUri }} style={{ width: box.width, height: box.height }} resizeMode="stretch" accessibilityLabel={photo.label} />
              <Svg width={box.width} height={box.height} style={StyleSheet.absoluteFill} pointerEvents="none">
                {marks.map((m, i) => (
                  <MarkShape key={i} mark={m} width={box.width} height={box.height} />
                ))}
                {draft ? <MarkShape mark={draft} width={box.width} height={box.height} /> : null}
              </Svg>
            </View>
          ) : null}
        </View>
        <View style={styles.bar} accessibilityRole="radiogroup" accessibilityLabel="Tool">
          {TOOLS.map((t) => (
            <Pressable
              key={t.tool}
              accessibilityRole="radio"
              accessibilityState={{ checked: tool === t.tool }}
              testID={`${testID}-tool-${t.tool}`}
              onPress={() => setTool(t.tool)}
              style={[styles.chip, tool === t.tool && styles.chipOn]}
            >
              <AppText variant="label" style={tool === t.tool ? styles.dark : styles.light}>
                {t.words}
              </AppText>
            </Pressable>
          ))}
        </View>
        <View style={styles.bar} accessibilityRole="radiogroup" accessibilityLabel="Colour">
          {MARK_COLOURS.map((c) => (
            <Pressable
              key={c}
              accessibilityRole="radio"
              accessibilityLabel={c}
              accessibilityState={{ checked: colour === c }}
              testID={`${testID}-colour-${c}`}
              onPress={() => setColour(c)}
              style={[styles.swatch, { backgroundColor: MARK_PAINT[c].fill, borderColor: MARK_PAINT[c].outline }, colour === c && styles.swatchOn]}
            />
          ))}
        </View>
        {tool === 'text' ? (
          <View style={styles.labelField}>
            <TextField label="Label text, then press the photo where it goes" value={label} onChangeText={setLabel} limit={MARK_TEXT_LIMIT} testID={`${testID}-label`} />
          </View>
        ) : null}
        {full ? <AppText style={styles.light}>{`At most ${MAX_MARKS} marks on one photo: undo one to draw another.`}</AppText> : null}
        {message ? (
          <AppText accessibilityLiveRegion="polite" style={styles.warn}>
            {message}
          </AppText>
        ) : null}
        <View style={styles.bar}>
          <Button label="Undo" tone="secondary" disabled={marks.length === 0} onPress={() => setMarks((m) => m.slice(0, -1))} testID={`${testID}-undo`} />
          <Button label="Clear all" tone="secondary" disabled={marks.length === 0} onPress={() => setMarks([])} testID={`${testID}-clear`} />
          <Button label="Cancel" tone="secondary" onPress={() => onClose(false)} testID={`${testID}-cancel`} />
          <Button label="Save marks" busy={save.isPending} disabled={query.isPending} onPress={onSave} testID={`${testID}-save`} />
        </View>
      </View>
    </Modal>
  );
}

const styles = StyleSheet.create({
  backdrop: { flex: 1, backgroundColor: '#141816', padding: space.md, gap: space.sm },
  stage: { flex: 1, alignItems: 'center', justifyContent: 'center' },
  bar: { flexDirection: 'row', flexWrap: 'wrap', gap: space.sm, alignItems: 'center', justifyContent: 'center' },
  chip: { minHeight: touchTarget, minWidth: touchTarget, paddingHorizontal: space.md, borderRadius: radius.md, borderWidth: 1, borderColor: colors.paper, justifyContent: 'center' },
  chipOn: { backgroundColor: colors.paper },
  swatch: { width: touchTarget, height: touchTarget, borderRadius: touchTarget / 2, borderWidth: 3 },
  swatchOn: { transform: [{ scale: 1.15 }], borderWidth: 5 },
  labelField: { backgroundColor: colors.surface, borderRadius: radius.md, padding: space.sm },
  light: { color: colors.paper },
  dark: { color: colors.ink },
  warn: { color: colors.ochreSoft },
});
