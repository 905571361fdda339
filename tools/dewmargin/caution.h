#pragma once
namespace dewmargin::cli {
// Shown in every --help: the tool supervises, it does not protect.
inline constexpr const char* k_caution =
    "Caution: dewmargin supervises; it is not a safety device and no substitute for the plant's own\n"
    "interlocks. Condensation causes water damage, mould, slip and electrical hazards. Follow local\n"
    "codes and licensed practice.";
}  // namespace dewmargin::cli
