#pragma once
// The caution every program shows in its --help (and README repeats): the tool supervises,
// it does not protect.
namespace dewmargin {
inline constexpr const char* k_caution =
    "Caution: dewmargin supervises; it is not a safety device and no substitute for the plant's own\n"
    "interlocks. Condensation causes water damage, mould, slip and electrical hazards. Follow local\n"
    "codes and licensed practice.";
}  // namespace dewmargin
