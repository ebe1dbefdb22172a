/* empty.c - start-up yardstick for make bench: does nothing, linked against hone's libraries. */
int main(void)
{
    return 0;
}
