export function startPane(): void {
  const mode = document.getElementById("mode");
  if (mode) mode.textContent = "preview";
}
