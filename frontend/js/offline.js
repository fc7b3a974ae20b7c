// Pending uploads kept on this device (IndexedDB) while the server cannot be reached,
// e.g. at a hilltop site with no network; sent later with "send pending". Each entry is
// {id, antennaId, file (a Blob with its name), fields, savedAt}.

const DB = "mastwatch";
const STORE = "pending-uploads";

function open() {
  return new Promise((resolve, reject) => {
    if (!("indexedDB" in window)) { reject(new Error("this browser cannot keep files offline")); return; }
    const req = indexedDB.open(DB, 1);
    req.onupgradeneeded = () => req.result.createObjectStore(STORE, { keyPath: "id", autoIncrement: true });
    req.onsuccess = () => resolve(req.result);
    req.onerror = () => reject(req.error);
  });
}

async function tx(mode, fn) {
  const db = await open();
  return new Promise((resolve, reject) => {
    const t = db.transaction(STORE, mode);
    const result = fn(t.objectStore(STORE));
    t.oncomplete = () => { db.close(); resolve(result.result ?? result); };
    t.onerror = () => { db.close(); reject(t.error); };
  });
}

export async function keep(antennaId, file, fields) {
  const buf = await file.arrayBuffer();
  return tx("readwrite", (s) => s.add({ antennaId, name: file.name, data: buf, fields, savedAt: new Date().toISOString() }));
}

export async function pending() {
  try { return await tx("readonly", (s) => s.getAll()); } catch { return []; }
}

export async function drop(id) {
  return tx("readwrite", (s) => s.delete(id));
}

/** An entry's bytes as a File again, for the upload call. */
export function asFile(entry) {
  return new File([entry.data], entry.name, { type: "application/octet-stream" });
}
