import { useEffect, useState } from 'react';

/** The value after it has stopped changing for `ms` (typing should not send a request per key). */
export function useSettled<T>(value: T, ms = 250): T {
  const [settled, setSettled] = useState(value);
  const key = JSON.stringify(value);
  useEffect(() => {
    const t = setTimeout(() => setSettled(value), ms);
    return () => clearTimeout(t);
    // The key stands for the value: a new object with the same content is no change.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, ms]);
  return settled;
}
