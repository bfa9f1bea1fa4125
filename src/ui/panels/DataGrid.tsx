import { useVirtualizer } from '@tanstack/react-virtual';
import { useEffect, useRef, useState } from 'react';
import type { DataSummary } from '../../worker/protocol';

const EMPTY = { start: 0, rows: [] as string[][], rowNumbers: [] as number[] };
import { useApp, useEnv } from '../context';
import { count, pct } from '../format';
import { Sparkline } from './Sparkline';

const ROW_H = 24;
const COL_W = 132;
/** Height of the sticky header row; the virtual rows start below it. */
const HEAD_H = 64;

/**
 * Virtualised grid: only the visible window of rows is fetched from the worker and rendered. The row column shows
 * spreadsheet row numbers (the header is row 1, so the first data row is row 2; 1 for a file without a header).
 */
export function DataGrid({ data }: { data: DataSummary }) {
  const { ctl } = useEnv();
  const scroller = useRef<HTMLDivElement>(null);
  const [win, setWin] = useState<{ start: number; rows: string[][]; rowNumbers: number[] }>(EMPTY);
  // New data start with an empty window (the rows are fetched again).
  const [shown, setShown] = useState(data);
  if (shown !== data) {
    setShown(data);
    setWin(EMPTY);
  }
  // eslint-disable-next-line react-hooks/incompatible-library -- the page does not use React Compiler
  const v = useVirtualizer({
    count: data.nRows,
    getScrollElement: () => scroller.current,
    estimateSize: () => ROW_H,
    overscan: 12,
    scrollMargin: HEAD_H,
  });
  // A row named elsewhere (the influential-rows view): scrolled into view and marked.
  const marked = useApp((s) => s.influence.showRow);
  useEffect(() => {
    if (!marked || marked.dataRow >= data.nRows) return;
    scroller.current?.scrollIntoView({ block: 'center' });
    v.scrollToIndex(marked.dataRow, { align: 'center' });
  }, [marked, data.nRows, v]);
  const items = v.getVirtualItems();
  const first = items[0]?.index ?? 0;
  const last = items[items.length - 1]?.index ?? 0;
  useEffect(() => {
    if (first >= win.start && last < win.start + win.rows.length) return;
    const start = Math.max(0, first - 60);
    let live = true;
    void ctl.getRows(start, last - first + 120).then((rows) => {
      if (live && rows) setWin({ start, rows: rows.cells, rowNumbers: rows.rowNumbers });
    });
    return () => {
      live = false;
    };
  }, [first, last, win, ctl]);
  const width = 64 + data.columns.length * COL_W;
  return (
    <div className="grid-wrap">
      <div
        ref={scroller}
        className="grid-scroll"
        role="grid"
        aria-label="Data rows"
        aria-rowcount={data.nRows + 1}
        tabIndex={0}
      >
        <div className="grid-head" role="row" style={{ width, height: HEAD_H }}>
          <div role="columnheader" className="cell rownum">
            Row
          </div>
          {data.columns.map((c) => (
            <div role="columnheader" key={c.name} className="cell head" style={{ width: COL_W }} title={c.reason}>
              <div className="colname">{c.name}</div>
              <div className="colmeta">
                {c.type} · {pct(c.missing / Math.max(1, data.nRows), 1)} missing
              </div>
              <Sparkline col={c} />
            </div>
          ))}
        </div>
        <div style={{ height: v.getTotalSize(), width, position: 'relative' }}>
          {items.map((it) => {
            const row = win.rows[it.index - win.start];
            const rowNumber = win.rowNumbers[it.index - win.start];
            return (
              <div
                key={it.key}
                role="row"
                aria-rowindex={it.index + 2}
                aria-selected={marked?.dataRow === it.index ? true : undefined}
                data-marked={marked?.dataRow === it.index ? 'true' : undefined}
                className={`grid-row${marked?.dataRow === it.index ? ' marked' : ''}`}
                style={{ transform: `translateY(${it.start - HEAD_H}px)`, height: ROW_H, width }}
              >
                <div role="rowheader" className="cell rownum">
                  {rowNumber === undefined ? '…' : count(rowNumber)}
                </div>
                {data.columns.map((c, j) => {
                  const text = row?.[j];
                  return (
                    <div
                      role="gridcell"
                      key={c.name}
                      className={`cell ${text === '' ? 'missing' : ''}`}
                      style={{ width: COL_W }}
                    >
                      {text === undefined ? '…' : text === '' ? 'missing' : text}
                    </div>
                  );
                })}
              </div>
            );
          })}
        </div>
      </div>
    </div>
  );
}
