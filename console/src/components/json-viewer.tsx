import { json } from '@codemirror/lang-json';
import { EditorSelection } from '@codemirror/state';
import { EditorView } from '@codemirror/view';
import CodeMirror, { type ReactCodeMirrorRef } from '@uiw/react-codemirror';
import { useEffect, useMemo, useRef } from 'react';
import { pointerToRange } from '@/lib/json-pointer-range';

const extensions = [json(), EditorView.lineWrapping];

/** A read-only JSON document; `pointer` selects and scrolls to the field it names. */
export function JsonViewer({ value, pointer, height = '28rem' }: { value: unknown; pointer?: string | null; height?: string }) {
  const text = useMemo(() => JSON.stringify(value, null, 2), [value]);
  const ref = useRef<ReactCodeMirrorRef>(null);
  useEffect(() => {
    const view = ref.current?.view;
    if (!view || pointer == null) return;
    const range = pointerToRange(text, pointer);
    if (!range) return;
    view.dispatch({ selection: EditorSelection.single(range.from, range.to), effects: EditorView.scrollIntoView(range.from, { y: 'center' }) });
    view.focus();
  }, [pointer, text]);
  return (
    <div className="overflow-hidden rounded-lg border border-ash-200">
      <CodeMirror ref={ref} value={text} height={height} editable={false} readOnly extensions={extensions} basicSetup={{ foldGutter: true, highlightActiveLine: false }} />
    </div>
  );
}
