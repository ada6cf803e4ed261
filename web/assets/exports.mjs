// Taking the plan away: files handed to the browser as downloads.

export function baseName(name) {
  const n = name || "plan";
  return n.replace(/\.[^.]*$/, "").replace(/[^A-Za-z0-9._-]+/g, "-") || "plan";
}

export function download(name, type, text) {
  const url = URL.createObjectURL(new Blob([text], { type: type }));
  const a = document.createElement("a");
  a.href = url;
  a.download = name;
  a.hidden = true;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10000);
}
