// Files from a drop, folders included: the DataTransfer only lists the top level, so folders
// are walked through the entries API. Anything that cannot be read is named, never skipped.

export interface DroppedFiles { files: File[]; unreadable: { name: string; reason: string }[] }

function fileOf(entry: FileSystemFileEntry): Promise<File> {
  return new Promise((resolve, reject) => entry.file(resolve, reject))
}

function readBatch(reader: FileSystemDirectoryReader): Promise<FileSystemEntry[]> {
  return new Promise((resolve, reject) => reader.readEntries(resolve, reject))
}

async function walk(entry: FileSystemEntry, out: DroppedFiles) {
  if (entry.isFile) {
    try {
      out.files.push(await fileOf(entry as FileSystemFileEntry))
    } catch {
      out.unreadable.push({ name: entry.name, reason: 'The browser could not read this file' })
    }
    return
  }
  if (entry.isDirectory) {
    const reader = (entry as FileSystemDirectoryEntry).createReader()
    // readEntries answers in batches (100 in Chromium) until it returns an empty one.
    for (;;) {
      let batch: FileSystemEntry[]
      try {
        batch = await readBatch(reader)
      } catch {
        out.unreadable.push({ name: `${entry.name}/`, reason: 'The browser could not read this folder' })
        return
      }
      if (!batch.length) return
      for (const child of batch) await walk(child, out)
    }
  }
}

export async function filesFromDrop(dt: DataTransfer): Promise<DroppedFiles> {
  const out: DroppedFiles = { files: [], unreadable: [] }
  // Entries must be taken before the first await: the DataTransfer is emptied once the event ends.
  const entries = [...dt.items].filter((i) => i.kind === 'file').map((i) => i.webkitGetAsEntry?.() ?? null)
  const plain = [...dt.files]
  if (!entries.length || entries.every((e) => e === null)) return { files: plain, unreadable: [] }
  for (const [n, entry] of entries.entries()) {
    if (entry) await walk(entry, out)
    else if (plain[n]) out.files.push(plain[n])
  }
  return out
}
