import { useEffect, useRef, useState, type ReactNode } from 'react';
import { StyleSheet, View } from 'react-native';

import { storage } from '@/hooks/storage';
import { useTheme } from '@/hooks/theme';

type Props = {
  /** The list on the left: never narrower than `minList`. */
  list: ReactNode;
  /** The detail on the right: takes the rest, or nothing while collapsed. */
  detail: ReactNode;
  minList: number;
  minDetail?: number;
  collapsed: boolean;
  /** Where the dragged width is remembered on this device. */
  storageKey: string;
  /** Tells whether the detail has room beside the list at all (it may not when the list needs much). */
  onFits?: (fits: boolean) => void;
};

const HANDLE = 12;

function readWidth(key: string): number | null {
  const n = Number(storage.get(key));
  return Number.isFinite(n) && n > 0 ? n : null;
}

/**
 * A list and its detail side by side, with a divider a person drags to give either more room.
 * The list keeps at least the width it needs; the detail gets the rest, and is left out when it
 * is collapsed or there is no room for it.
 */
export function SplitPane({ list, detail, minList, minDetail = 360, collapsed, storageKey, onFits }: Props) {
  const { colors } = useTheme();
  const [total, setTotal] = useState(0);
  const [wanted, setWanted] = useState<number | null>(() => readWidth(storageKey));
  const [dragging, setDragging] = useState(false);
  const fits = total === 0 || total - minDetail - HANDLE >= minList;
  useEffect(() => onFits?.(fits), [fits, onFits]);
  const max = Math.max(minList, total - minDetail - HANDLE);
  const width = Math.min(max, Math.max(minList, wanted ?? Math.round(total * 0.5)));
  // Where the drag started: the pointer's x and the list's width then.
  const start = useRef({ x: 0, width: 0 });
  const to = (pageX: number) => Math.round(start.current.width + pageX - start.current.x);

  const showDetail = !collapsed && fits;
  return (
    <View style={styles.row} onLayout={(e) => setTotal(Math.round(e.nativeEvent.layout.width))}>
      <View style={showDetail ? { width } : styles.fill} testID="list-pane">
        {list}
      </View>
      {showDetail ? (
        <>
          <View
            onStartShouldSetResponder={() => true}
            onMoveShouldSetResponder={() => true}
            onResponderGrant={(e) => {
              start.current = { x: e.nativeEvent.pageX, width };
              setDragging(true);
            }}
            onResponderMove={(e) => setWanted(to(e.nativeEvent.pageX))}
            onResponderRelease={(e) => {
              setDragging(false);
              storage.set(storageKey, String(to(e.nativeEvent.pageX)));
            }}
            onResponderTerminate={() => setDragging(false)}
            role="separator"
            aria-orientation="vertical"
            aria-label="Drag to resize the list and the detail"
            aria-valuenow={width}
            aria-valuemin={minList}
            aria-valuemax={max}
            testID="split-divider"
            style={[styles.handle, { cursor: 'col-resize' } as object]}
          >
            <View style={[styles.line, { backgroundColor: dragging ? colors.accent : colors.border }]} />
          </View>
          <View style={styles.fill}>{detail}</View>
        </>
      ) : null}
    </View>
  );
}

const styles = StyleSheet.create({
  row: { flex: 1, flexDirection: 'row' },
  fill: { flex: 1, minWidth: 0 },
  handle: { width: HANDLE, alignItems: 'center' },
  line: { width: 1, flex: 1 },
});
