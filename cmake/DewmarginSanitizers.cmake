# Sanitizer policy: AddressSanitizer + UndefinedBehaviorSanitizer when DEWMARGIN_SANITIZE is on.
# UBSan is made fatal so that a finding fails the test that triggered it.
function(dewmargin_set_sanitizers target)
  if(DEWMARGIN_SANITIZE)
    set(flags -fsanitize=address,undefined -fno-sanitize-recover=undefined -fno-omit-frame-pointer)
    target_compile_options(${target} PRIVATE ${flags})
    target_link_options(${target} PRIVATE ${flags})
  endif()
endfunction()
