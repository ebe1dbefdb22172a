/* test_alloc.c - the program's memory policy takes effect. */
#include "testutil.h"
#include "sh_alloc.h"

#if defined(__GLIBC__)
#include <malloc.h>
#endif

/* After sh_alloc_policy a block of 4 MiB comes from the heap, not from a
 * mapping of its own (glibc's default rule maps blocks from 128 KiB until
 * a mapped block is freed); mallinfo2's hblks counts the mapped blocks. */
static void test_policy(void **state)
{
    (void)state;
#if defined(__GLIBC__)
    sh_alloc_policy();
    struct mallinfo2 before = mallinfo2();
    char *p = malloc((size_t)4 << 20);
    assert_non_null(p);
    p[0] = 1;
    struct mallinfo2 after = mallinfo2();
    free(p);
    assert_int_equal(after.hblks, before.hblks);
#else
    skip();
#endif
}

int main(void)
{
    const struct CMUnitTest tests[] = {
        cmocka_unit_test(test_policy),
    };
    return cmocka_run_group_tests(tests, NULL, NULL);
}
