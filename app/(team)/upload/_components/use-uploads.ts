"use client";

import { useRouter } from "next/navigation";
import { useCallback, useEffect, useRef, useState } from "react";
import { saveProfileAction } from "../../actions";
import { awaitAnalysis, sendLog } from "./upload-transport";
import {
  importable,
  mapComplete,
  phaseForAirframe,
  readItem,
  type AirframeChoice,
  type UploadItem,
} from "./upload-item";

// Two at a time: the pit laptop's link and the analysis workers both stay busy.
const PARALLEL_UPLOADS = 2;
/** How long a file keeps retrying while the server says it is busy, ms. */
const BUSY_RETRY_FOR_MS = 10 * 60_000;

export interface Uploads {
  items: UploadItem[];
  /** Files needing a column map, in the order they were added. */
  pendingMaps: UploadItem[];
  /** How many files the import button would send. */
  importableCount: number;
  profileName: string;
  profileNote: string;
  /** Step 1 → 2: read each file's head, match it to an airframe, propose a column map. */
  add: (files: File[]) => Promise<void>;
  chooseAirframe: (key: string, airframeId: string) => void;
  /** From the column-map table: the note says whether the map is complete. */
  editMap: (key: string, mapText: string) => void;
  /** From the map text field or an import profile: no note, like typing. */
  setMapText: (key: string, mapText: string) => void;
  setProfileName: (name: string) => void;
  saveProfile: (mapText: string) => Promise<void>;
  /** Steps 4–6: upload, analysis, verdict, for every importable file. */
  importAll: () => Promise<void>;
  clear: () => void;
}

/**
 * The upload screen's state machine, one item per file: files → metadata (airframe match) →
 * column map → upload progress → analysis progress → verdict (see `Phase`).
 */
export function useUploads(airframes: AirframeChoice[]): Uploads {
  const router = useRouter();
  const [items, setItems] = useState<UploadItem[]>([]);
  const [profileName, setProfileName] = useState("");
  const [profileNote, setProfileNote] = useState("");
  // importAll runs after renders it did not see: it reads the latest list through a ref.
  const itemsRef = useRef<UploadItem[]>([]);
  useEffect(() => {
    itemsRef.current = items;
  }, [items]);

  const update = useCallback((key: string, patch: Partial<UploadItem>) => {
    setItems((list) => list.map((i) => (i.key === key ? { ...i, ...patch } : i)));
  }, []);

  async function add(files: File[]) {
    const fresh: UploadItem[] = [];
    for (const file of files) fresh.push(await readItem(file, airframes));
    setItems((list) => [...list, ...fresh]);
  }

  async function upload(item: UploadItem): Promise<void> {
    update(item.key, { phase: "uploading", message: "" });
    const giveUpAt = Date.now() + BUSY_RETRY_FOR_MS;
    let sent = await sendLog(item, (uploadFraction) => update(item.key, { uploadFraction }));
    // A busy server said when to come back; nothing of the file was kept, so send it again.
    while (!sent.ok && sent.retryAfterS !== undefined && Date.now() < giveUpAt) {
      const waitS = sent.retryAfterS * (1 + Math.random() * 0.5);
      update(item.key, {
        uploadFraction: 0,
        message: `${sent.message} Retrying in ${Math.ceil(waitS)} s.`,
      });
      await new Promise((r) => setTimeout(r, waitS * 1000));
      update(item.key, { message: "" });
      sent = await sendLog(item, (uploadFraction) => update(item.key, { uploadFraction }));
    }
    if (!sent.ok) {
      update(item.key, { phase: "failed", message: sent.message });
      return;
    }
    update(item.key, {
      phase: "analysing",
      uploadFraction: 1,
      logId: sent.logId,
      message: sent.duplicate
        ? `already uploaded (for ${sent.airframe ?? "?"}): showing its verdict`
        : "",
    });
    const result = await awaitAnalysis(sent.logId, (analysisFraction) =>
      update(item.key, { analysisFraction }),
    );
    update(
      item.key,
      result.ok
        ? { phase: "done", analysisFraction: 1, message: result.message }
        : { phase: "failed", message: result.message },
    );
  }

  async function importAll() {
    const queue = itemsRef.current.filter(importable);
    const workers = Array.from({ length: PARALLEL_UPLOADS }, async () => {
      for (let next = queue.shift(); next; next = queue.shift()) await upload(next);
    });
    await Promise.all(workers);
    router.refresh();
  }

  async function saveProfile(mapText: string) {
    const form = new FormData();
    form.set("name", profileName);
    form.set("mapText", mapText);
    const r = await saveProfileAction({ ok: false, message: "" }, form);
    setProfileNote(r.message + (r.fieldErrors ? ` ${Object.values(r.fieldErrors).join(" ")}` : ""));
  }

  return {
    items,
    pendingMaps: items.filter((i) => i.phase === "needs-map"),
    importableCount: items.filter(importable).length,
    profileName,
    profileNote,
    add,
    chooseAirframe: (key, airframeId) => {
      const item = items.find((i) => i.key === key);
      if (!item) return;
      update(key, { airframeId, matchedBy: "chosen", phase: phaseForAirframe(item, airframeId) });
    },
    editMap: (key, mapText) =>
      update(key, {
        mapText,
        message: mapComplete(mapText) ? "" : "the column map is not complete yet",
      }),
    setMapText: (key, mapText) => update(key, { mapText }),
    setProfileName,
    saveProfile,
    importAll,
    clear: () => setItems([]),
  };
}
