using System.Text;

namespace Lookahead.Api.Tests.Support;

/// <summary>Reads the CSV the service answers with, for assertions.</summary>
public static class CsvText
{
    /// <summary>RFC 4180 records: quoted fields may hold commas, quotes ("") and line breaks (messages do). Empty lines are skipped.</summary>
    public static List<List<string>> Records(string text)
    {
        var records = new List<List<string>>();
        var record = new List<string>();
        var field = new StringBuilder();
        bool quoted = false;
        void EndRecord()
        {
            record.Add(field.ToString().TrimEnd('\r'));
            field.Clear();
            if (record.Count > 1 || record[0].Length > 0)
            {
                records.Add(record);
            }

            record = [];
        }

        for (int i = 0; i < text.Length; i++)
        {
            char c = text[i];
            if (quoted)
            {
                if (c == '"' && i + 1 < text.Length && text[i + 1] == '"')
                {
                    field.Append('"');
                    i++;
                }
                else if (c == '"')
                {
                    quoted = false;
                }
                else
                {
                    field.Append(c);
                }
            }
            else if (c == '"')
            {
                quoted = true;
            }
            else if (c == ',')
            {
                record.Add(field.ToString());
                field.Clear();
            }
            else if (c == '\n')
            {
                EndRecord();
            }
            else
            {
                field.Append(c);
            }
        }

        if (field.Length > 0 || record.Count > 0)
        {
            EndRecord();
        }

        return records;
    }
}
