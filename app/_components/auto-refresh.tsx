"use client";

import { useRouter } from "next/navigation";
import { useEffect } from "react";

export interface AutoRefreshProps {
  seconds: number;
}

/** Re-renders the page's server data every few seconds, so a screen on a stand stays current. */
export function AutoRefresh({ seconds }: AutoRefreshProps) {
  const router = useRouter();
  useEffect(() => {
    const t = setInterval(() => router.refresh(), seconds * 1000);
    return () => clearInterval(t);
  }, [router, seconds]);
  return null;
}
