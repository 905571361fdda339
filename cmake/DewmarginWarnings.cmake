# Warning policy: one function, applied to every target of the project.
# (-Wnull-dereference is left out: at -O2 it fires inside nlohmann-json's inlined code.)
function(dewmargin_set_warnings target)
  target_compile_options(${target} PRIVATE -Wall -Wextra -Wpedantic -Wshadow -Wconversion
                         -Wno-sign-conversion -Wnon-virtual-dtor -Wold-style-cast)
  if(DEWMARGIN_WERROR)
    target_compile_options(${target} PRIVATE -Werror)
  endif()
endfunction()
