"use client";

import { useEffect, useRef, useState } from "react";

/**
 * The width of the element `ref` is attached to, kept current as the page resizes (0 before the
 * first measurement), so a chart can space its axis labels for the room it has.
 */
export function useContainerWidth<Element extends HTMLElement>() {
  const ref = useRef<Element>(null);
  const [width, setWidth] = useState(0);
  useEffect(() => {
    const element = ref.current;
    if (!element) return;
    const observer = new ResizeObserver(([entry]) => setWidth(entry.contentRect.width));
    observer.observe(element);
    return () => observer.disconnect();
  }, []);
  return [ref, width] as const;
}
